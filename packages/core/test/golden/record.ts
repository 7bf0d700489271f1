/**
 * Records the golden fixtures (test/golden/fixtures.json and the full files under test/golden/files/) from the code as
 * it is. Run it only to pin outputs that changed on purpose, and say why in the commit:
 *   npx tsx test/golden/record.ts                  (from packages/core) every job
 *   npx tsx test/golden/record.ts --only "ID|ID"   those jobs (of any kind) and the jobs without a fixture; the rest kept
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { format } from "prettier";
import { EXPORT_JOBS, RENDER_JOBS, TABLES_JOBS } from "./cases.ts";
import { FULL_FILES, fixturesUrl, filesUrl, type Fixtures } from "./fixtures.ts";
import { exportOutput, renderOutputs, tablesOutput } from "./outputs.ts";

const dir = mkdtempSync(join(tmpdir(), "skewsmith-golden-"));
try {
  const onlyAt = process.argv.indexOf("--only");
  const only = onlyAt >= 0 ? new Set((process.argv[onlyAt + 1] ?? "").split("|")) : null;
  const kept: Fixtures =
    only && existsSync(fixturesUrl) ? JSON.parse(readFileSync(fixturesUrl, "utf8")) : { tables: {}, render: {}, export: {} };
  const fixtures: Fixtures = kept;
  const wanted = (kind: keyof Fixtures, id: string) => only === null || only.has(id) || fixtures[kind][id] === undefined;
  for (const job of TABLES_JOBS) {
    if (!wanted("tables", job.id)) continue;
    const { text, digest } = await tablesOutput(job, dir);
    fixtures.tables[job.id] = digest;
    const full = FULL_FILES.tables[job.id];
    if (full) writeFileSync(new URL(full, filesUrl), text);
    console.log(`tables ${job.id}: ${digest.means.length} frames`);
  }
  for (const job of RENDER_JOBS) {
    if (!wanted("render", job.id)) continue;
    fixtures.render[job.id] = await renderOutputs(job, dir);
    console.log(`render ${job.id}`);
  }
  for (const job of EXPORT_JOBS) {
    if (!wanted("export", job.id)) continue;
    const { digest, files } = await exportOutput(job, mkdtempSync(join(dir, "job-")));
    fixtures.export[job.id] = digest;
    for (const [name, file] of Object.entries(FULL_FILES.export[job.id] ?? {})) writeFileSync(new URL(file, filesUrl), files.get(name)!);
    console.log(`export ${job.id}: ${digest.files.length} files`);
  }
  const text = await format(JSON.stringify(fixtures), { parser: "json", printWidth: 140 });
  writeFileSync(fixturesUrl, text);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
