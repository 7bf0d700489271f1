import { afterAll, describe, expect, it } from "vitest";
import { workdir } from "../helpers/cli.ts";

const w = workdir();
afterAll(() => w.remove());

describe("skewsmith (the real binary)", () => {
  it("--help lists every command on stdout and exits 0", async () => {
    const r = await w.run("--help");
    expect(r.code).toBe(0);
    expect(r.stderr).toBe("");
    expect(r.stdout).toMatch(/^usage: skewsmith <command>/);
    for (const name of ["tables", "render", "fit"]) expect(r.stdout).toMatch(new RegExp(`^  ${name} `, "m"));
  });

  it("each command's --help prints its own usage on stdout and exits 0", async () => {
    const results = await Promise.all(["tables", "render", "fit"].map((name) => w.run(name, "--help")));
    results.forEach((r, i) => {
      const name = ["tables", "render", "fit"][i];
      expect(r.code, name).toBe(0);
      expect(r.stderr, name).toBe("");
      expect(r.stdout, name).toMatch(new RegExp(`^usage: skewsmith ${name} `));
    });
    expect(results[1].stdout).toContain("--pass");
    expect(results[2].stdout).toContain("--align");
  });

  it("no command is a usage error: help on stderr, nothing on stdout, exit 2", async () => {
    const r = await w.run();
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/usage: skewsmith <command>/);
  });

  it("an unknown command is named on stderr with the known ones, exit 2, nothing on stdout", async () => {
    const r = await w.run("spin");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain('"spin"');
    expect(r.stderr).toContain("tables, render, fit");
  });
});
