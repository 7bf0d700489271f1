import { readFileSync, readdirSync } from "node:fs";
import { afterAll, describe, expect, it } from "vitest";
import { workdir } from "../helpers/cli.ts";
import { pngBytes } from "../helpers/pngBytes.ts";

const w = workdir();
afterAll(() => w.remove());

const effect = {
  canvas: { width: 24, height: 16 },
  pivot: { x: 12, y: 8 },
  angles: { sweep: { from: -135, to: 135, frames: 9 } },
  edges: "clip",
  columnGroup: 2,
};
w.write("spin.json", effect);
w.write("canvas.png", pngBytes({ width: 24, height: 16, depth: 8, colorType: 0, samples: Array.from({ length: 384 }, (_, i) => i % 251) }));

describe("the built command line (dist/cli.mjs) says exactly what the source says", () => {
  it.each([
    [["--help"]],
    [["--version"]],
    [["tables", "spin.json"]],
    [["tables", "spin.json", "--pretty"]],
    [["budget", "spin.json", "--dedupe"]],
    [["fit", "spin.json", "--json"]],
    [["render", "spin.json", "--frame", "-1", "--image", "canvas.png", "--out", "never.png"]],
    [["tables", "missing.json"]],
    [["export", "spin.json", "--bogus"]],
  ])("skewsmith %j", async (args) => {
    const [built, source] = await Promise.all([w.run(...args), w.runSource(...args)]);
    expect(built).toEqual(source);
  });

  it("export writes the same files from the build as from the source, and render the same PNG", async () => {
    const [a, b] = await Promise.all([
      w.run("export", "spin.json", "--out", "built", "--zip", "built.zip"),
      w.runSource("export", "spin.json", "--out", "source", "--zip", "source.zip"),
    ]);
    expect([a.code, b.code]).toEqual([0, 0]);
    const names = readdirSync(w.path("built")).sort();
    expect(readdirSync(w.path("source")).sort()).toEqual(names);
    for (const n of names) expect(readFileSync(w.path(`built/${n}`)).equals(readFileSync(w.path(`source/${n}`))), n).toBe(true);
    expect(readFileSync(w.path("built.zip")).equals(readFileSync(w.path("source.zip")))).toBe(true);
    const [r1, r2] = await Promise.all([
      w.run("render", "spin.json", "--image", "canvas.png", "--frame", "3", "--out", "built.png"),
      w.runSource("render", "spin.json", "--image", "canvas.png", "--frame", "3", "--out", "source.png"),
    ]);
    expect([r1.code, r2.code]).toEqual([0, 0]);
    expect(readFileSync(w.path("built.png")).equals(readFileSync(w.path("source.png")))).toBe(true);
  });
});

describe("plain one-line messages", () => {
  it("--version prints the package version on stdout", async () => {
    const version = (JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }).version;
    expect(await w.run("--version")).toEqual({ code: 0, stdout: `skewsmith ${version}\n`, stderr: "" });
  });

  it("--frame -1 names the frames allowed, not the argument parser's advice", async () => {
    const r = await w.run("render", "spin.json", "--image", "canvas.png", "--frame", "-1", "--out", "x.png");
    expect(r).toEqual({
      code: 2,
      stdout: "",
      stderr: 'skewsmith render: --frame: "-1" is not allowed; allowed a whole number from 0 to 8\n',
    });
  });

  it("a missing input file is named in one line, without the file system's error code", async () => {
    const [effectFile, image] = await Promise.all([
      w.run("tables", "missing.json"),
      w.run("render", "spin.json", "--image", "nowhere.png", "--frame", "0", "--out", "x.png"),
    ]);
    expect(effectFile).toEqual({ code: 2, stdout: "", stderr: "skewsmith tables: missing.json: no such file or folder\n" });
    expect(image).toEqual({ code: 2, stdout: "", stderr: "skewsmith render: nowhere.png: no such file or folder\n" });
  });

  it("an unknown option, an option without its value and a value for a flag each get one line naming the option", async () => {
    const [unknown, missing, flag] = await Promise.all([
      w.run("tables", "spin.json", "--colour"),
      w.run("render", "spin.json", "--frame"),
      w.run("tables", "spin.json", "--pretty=yes"),
    ]);
    expect(unknown.stderr).toBe("skewsmith tables: unknown option --colour; allowed --pretty (--help for details)\n");
    expect(missing.stderr).toBe("skewsmith render: --frame: needs a value\n");
    expect(flag.stderr).toBe("skewsmith tables: --pretty: takes no value\n");
    for (const r of [unknown, missing, flag]) expect([r.code, r.stdout]).toEqual([2, ""]);
  });
});
