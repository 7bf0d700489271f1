import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { processIo } from "../../src/cli/io.ts";
import { main } from "../../src/cli/main.ts";
import { CASES } from "./cases.ts";
import { run } from "./toolchain.ts";

const dir = mkdtempSync(join(tmpdir(), "skewsmith-cli-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const effectFile = (id: string, name: string) => {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(CASES.find((c) => c.id.startsWith(id))!.effect));
  return path;
};
const compass = effectFile("compass, defaults", "compass.json");
const wide = effectFile("wide, int16", "wide.effect.json");
const tall = effectFile("tall", "tall.json");

async function cli(...args: string[]) {
  let stdout = "";
  let stderr = "";
  const code = await main(args, { ...processIo, stdout: (t) => void (stdout += t), stderr: (t) => void (stderr += t) });
  return { code, stdout, stderr };
}

describe("skewsmith export", () => {
  it("writes every file of the bundle into --out, labelled after the effect file, and lists them", async () => {
    const out = join(dir, "out");
    const r = await cli("export", compass, "--out", out);
    expect(r.code).toBe(0);
    const files = ["README.txt", "compass.h", "compass.c", "compass.6502.s", "compass.68k.s", "compass.arm.s", "compass.z80.s"];
    files.push("compass.le.bin", "compass.be.bin", "compass.json", "compass_runtime.c", "compass.effect.json");
    expect(readdirSync(out).sort()).toEqual([...files].sort());
    for (const f of files) expect(r.stdout).toContain(join(out, f));
    // The label comes from "wide.effect.json" without ".effect.json".
    expect((await cli("export", wide, "--out", join(dir, "wide"), "--outputs", "c")).code).toBe(0);
    expect(readdirSync(join(dir, "wide")).sort()).toEqual(["README.txt", "wide.c", "wide.effect.json", "wide.h"]);
  });

  it("writes the zip with --zip, and unzip lists the files the chosen outputs make", async () => {
    const zip = join(dir, "storm.zip");
    const r = await cli(
      "export",
      compass,
      "--zip",
      zip,
      "--label",
      "storm",
      "--outputs",
      "6502,z80,bin",
      "--sign",
      "scroll",
      "--register-bits",
      "9",
      "--dedupe",
    );
    expect(r.code).toBe(0);
    run("unzip", ["-tq", zip], dir, false); // every entry's CRC checks out
    const names = run("unzip", ["-Z1", zip], dir).trim().split("\n").sort();
    expect(names).toEqual(["README.txt", "storm.6502.s", "storm.be.bin", "storm.effect.json", "storm.le.bin", "storm.z80.s"]);
    const z80 = run("unzip", ["-p", zip, "storm.z80.s"], dir);
    expect(z80).toContain("sign: scroll");
    expect(z80).toContain("register width: 9 bits");
    expect(z80).toContain("storm_frame:");
  });

  it("regenerates the same files from the bundle's effect document with the command its README gives", async () => {
    const first = join(dir, "first");
    expect((await cli("export", wide, "--out", first, "--label", "wide", "--split", "--sign", "scroll", "--element", "int32")).code).toBe(
      0,
    );
    const readme = readFileSync(join(first, "README.txt"), "utf8");
    const command = /^ {2}skewsmith (export \S+\.effect\.json --out DIR .*)$/m.exec(readme)![1].split(" ");
    const again = join(dir, "again");
    const args = command.map((a) => (a === "DIR" ? again : a.endsWith(".effect.json") ? join(first, a) : a));
    expect((await cli(...args)).code).toBe(0);
    for (const f of readdirSync(first)) expect(readFileSync(join(again, f)).equals(readFileSync(join(first, f))), f).toBe(true);
  });

  it.each([
    [["--sign", "up"], '--sign: "up" is not allowed; allowed one of "shift", "scroll"'],
    [["--element", "int8"], '--element: "int8" is not allowed (the exported values run from'],
    [["--register-bits", "ten"], '--register-bits: "ten" is not allowed; allowed a whole number from 1 to 32'],
    [["--outputs", "c,pdf"], '--outputs: "pdf" is not allowed'],
    [["--label", "9x"], '--label: "9x" is not allowed'],
    [["--bogus"], "unknown option --bogus; allowed"],
  ])("refuses %j with exit code 2 and a message naming the option", async (args, message) => {
    const out = join(dir, "refused");
    const r = await cli("export", wide, "--out", out, ...args);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(message);
    expect(existsSync(out)).toBe(false);
  });

  it("refuses --half for tables that are not antisymmetric and asks for --out or --zip", async () => {
    const r = await cli("export", tall, "--out", join(dir, "t"), "--half");
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("--half is not available for this effect: h is not antisymmetric");
    const none = await cli("export", tall);
    expect(none.code).toBe(2);
    expect(none.stderr).toContain("--out DIR or --zip FILE is required");
  });
});

it("L.json in the bundle is the tables document that `skewsmith tables` prints", async () => {
  const out = join(dir, "json");
  expect((await cli("export", wide, "--out", out, "--outputs", "json")).code).toBe(0);
  const tables = await cli("tables", wide);
  expect(tables.code).toBe(0);
  expect(JSON.parse(readFileSync(join(out, "wide.json"), "utf8"))).toEqual(JSON.parse(tables.stdout));
});

describe("skewsmith budget", () => {
  it("prints the bytes per table, the total, per output and per option; with --json the same as data", async () => {
    const text = await cli("budget", compass, "--dedupe", "--split");
    expect(text.code).toBe(0);
    expect(text.stdout).toContain("ROM budget for compass: 64 frames");
    const json = await cli("budget", compass, "--dedupe", "--split", "--json");
    const report = JSON.parse(json.stdout) as {
      totalBytes: number;
      tables: { name: string; bytes: number }[];
      outputs: { output: string; romBytes: number | null }[];
    };
    for (const t of report.tables) expect(text.stdout).toMatch(new RegExp(`${t.name}\\s.*\\s${t.bytes}\\n`));
    // The exported binary is as long as the budget says.
    const out = join(dir, "budgeted");
    await cli("export", compass, "--dedupe", "--split", "--out", out, "--outputs", "bin");
    expect(readFileSync(join(out, "compass.le.bin")).length).toBe(report.outputs.find((o) => o.output === "bin")!.romBytes);
  });

  it("reports an option that cannot apply as not available instead of failing", async () => {
    const r = await cli("budget", tall);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/half off: not available: h is not antisymmetric/);
  });
});

it("the installed skewsmith command runs export and budget (bin/skewsmith.mjs)", () => {
  const bin = fileURLToPath(new URL("../../bin/skewsmith.mjs", import.meta.url));
  const help = spawnSync(process.execPath, [bin, "--help"], { encoding: "utf8" });
  expect(help.stdout).toMatch(/export\s+write the tables/);
  expect(help.stdout).toMatch(/budget\s+print the ROM bytes/);
  const out = join(dir, "bin-run");
  const r = spawnSync(process.execPath, [bin, "export", compass, "--out", out, "--outputs", "68k"], { encoding: "utf8" });
  expect(r.status, r.stderr).toBe(0);
  run("m68k-linux-gnu-as", ["--fatal-warnings", "-o", "c.o", "compass.68k.s"], out);
  const budget = spawnSync(process.execPath, [bin, "budget", compass, "--json"], { encoding: "utf8" });
  expect(budget.status, budget.stderr).toBe(0);
  expect(JSON.parse(budget.stdout)).toMatchObject({ label: "compass", frames: 64 });
}, 60_000);
