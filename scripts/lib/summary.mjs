// Reads vitest's JSON report and prints the one line CI looks for: "N passed, N failed[, N skipped]".
// A test file that could not run at all (an import error, a failing hook) counts as one failure, so it
// is never silently dropped from the count. Exits non-zero when anything failed or the report is missing.
import { readFileSync } from "node:fs";

const file = process.argv[2];
let report;
try {
  report = JSON.parse(readFileSync(file, "utf8"));
} catch (error) {
  console.log("0 passed, 1 failed");
  console.error(`no test report at ${file} (${error.message}): vitest did not finish`);
  process.exit(1);
}
const passed = report.numPassedTests ?? 0;
const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
let failed = report.numFailedTests ?? 0;
for (const suite of report.testResults ?? []) {
  const failedInside = (suite.assertionResults ?? []).some((a) => a.status === "failed");
  if (suite.status === "failed" && !failedInside) {
    failed += 1;
    console.error(`${suite.name}: ${String(suite.message ?? "failed before its tests ran").split("\n")[0]}`);
  }
}
if (report.success === false && failed === 0) failed = 1; // e.g. unhandled errors between tests
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failed > 0 ? 1 : 0);
