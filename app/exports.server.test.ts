import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { EXPORT_MAX_BYTES, exportBudget, exportBundle, parseEffect } from "@skewsmith/core";
import { strFromU8, unzipSync } from "fflate";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../tests/factories.ts";
import { testDb } from "../tests/support/db.ts";
import { profileLabel } from "./exports/defaults.ts";
import { deleteEffect, saveEffectDocument } from "./models/effects.server.ts";
import { DomainError } from "./models/errors.ts";
import {
  effectExportSource,
  etagMatches,
  exportQuery,
  exportResponse,
  planEffectExport,
  planProjectExport,
  projectExportSources,
  PROJECT_EXPORT_MAX_BYTES,
  type ExportPlan,
} from "./exports.server.ts";
import type { ProfileExportSettings } from "./profiles/apply.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const db = testDb();
afterAll(() => db.$client.end());

const DOC = { canvas: { width: 24, height: 16 }, pivot: { x: 12, y: 8 }, angles: { sweep: { from: 0, to: 90, frames: 6 } } };
const query = (q: string) => exportQuery(new URLSearchParams(q));
const source = (name = "Harbour light", document: unknown = DOC, profile = null as ProfileExportSettings | null) => ({
  effect: { id: "00000000-0000-4000-8000-000000000001", name, document },
  profile,
});

function problem(work: () => unknown): DomainError {
  try {
    work();
  } catch (error) {
    if (error instanceof DomainError) return error;
    throw error;
  }
  throw new Error("expected a DomainError");
}

describe("export options from a query string", () => {
  it("reads every option core takes, under core's names", () => {
    expect(query("outputs=c,6502&label=quay&sign=scroll&registerBits=9&element=int16&split=true&half=0&dedupe")).toEqual({
      outputs: ["c", "6502"],
      label: "quay",
      sign: "scroll",
      registerBits: 9,
      element: "int16",
      split: true,
      half: false,
      dedupe: true,
    });
    // Repeated outputs add up and come back in core's order; registerBits=none asks for plain signed values.
    expect(query("outputs=z80&outputs=c")).toEqual({ outputs: ["c", "z80"] });
    expect(query("registerBits=none")).toEqual({ registerBits: null });
    expect(query("")).toEqual({});
  });

  it("refuses a bad value with a 400 that names the parameter and what is allowed", () => {
    const cases: [string, string, RegExp][] = [
      [
        "outputs=c,pdp11",
        "outputs",
        /outputs: "pdp11" is not allowed; allowed one of "c", "6502", "68k", "arm", "z80", "bin", "json", "runtime"/,
      ],
      ["outputs=", "outputs", /outputs: .* not allowed; allowed a non-empty list/],
      ["label=9lives", "label", /label: "9lives" is not allowed .*allowed a letter followed by/],
      ["label=int", "label", /C or C\+\+ keyword/],
      ["sign=up", "sign", /sign: "up" is not allowed; allowed one of "shift", "scroll"/],
      ["registerBits=33", "registerBits", /registerBits: 33 is not allowed; allowed a whole number from 1 to 32/],
      ["registerBits=8.5", "registerBits", /registerBits: "8.5" is not allowed; allowed a whole number from 1 to 32/],
      ["registerBits=1e3", "registerBits", /registerBits: "1e3" is not allowed/],
      ["element=float", "element", /element: "float" is not allowed; allowed one of "auto", /],
      ["split=maybe", "split", /split: "maybe" is not allowed; allowed true or false/],
      ["half=yes", "half", /half: "yes" is not allowed/],
      ["dedupe=2", "dedupe", /dedupe: "2" is not allowed/],
      ["sign=shift&sign=scroll", "sign", /sign: given 2 times with different values; give it once/],
    ];
    for (const [q, field, message] of cases) {
      const error = problem(() => query(q));
      expect(error.status, q).toBe(400);
      expect(error.field, q).toBe(field);
      expect(error.message, q).toMatch(message);
    }
  });

  it("ignores parameters it does not know, and none of them reaches an object's prototype", () => {
    const q = query("__proto__=polluted&constructor=x&prototype=y&toString=z&hasOwnProperty=1&format=zip&outputs=json");
    expect(q).toEqual({ outputs: ["json"] });
    expect(Object.getPrototypeOf(q)).toBe(Object.prototype);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    // A flag word that names an Object.prototype member is still just a bad value.
    expect(problem(() => query("split=constructor")).field).toBe("split");
    expect(problem(() => query("split=__proto__")).field).toBe("split");
  });
});

describe("a target profile's export defaults", () => {
  // The mapping itself is exportDefaultsForProfile (app/exports/defaults.ts, tested in targetProfiles.server.test.ts);
  // here: what an export planned from a stored profile does with it.
  it("labels with the prefix before the effect's own label, exports the profile's dialects and its stored options", () => {
    const storm = { labelPrefix: "storm", dialects: ["c", "68k"], exportOptions: { sign: "scroll", registerBits: 9, split: true } };
    expect(planEffectExport(source("Tilt", DOC, storm), {}).fileName).toBe("storm_tilt.zip");
    expect(Object.keys(unzipSync(planEffectExport(source("Tilt", DOC, storm), {}).build())).sort()).toEqual([
      "README.txt",
      "storm_tilt.68k.s",
      "storm_tilt.c",
      "storm_tilt.effect.json",
      "storm_tilt.h",
    ]);
    expect(planEffectExport(source("Tilt", DOC, storm), {}).etag).toBe(
      planEffectExport(source("Tilt"), query("label=storm_tilt&outputs=c,68k&sign=scroll&registerBits=9&split")).etag,
    );
  });

  it("leaves out what core would refuse, and keys that are not options", () => {
    const stored = JSON.parse('{"__proto__": {"polluted": 1}, "sign": "sideways", "element": "int8", "label": "for", "bogus": 1}');
    const plan = planEffectExport(source("Tilt", DOC, { labelPrefix: "do", dialects: ["cobol"], exportOptions: stored }), {});
    // "do" alone is a C keyword, but as a prefix it makes the valid label do_tilt; the unknown dialect and option go.
    expect(plan.etag).toBe(planEffectExport(source("Tilt"), query("label=do_tilt&element=int8")).etag);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

function run(bin: string, args: string[], cwd: string): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve) => {
    execFile(bin, args, { cwd, encoding: "utf8" }, (error, _stdout, stderr) =>
      resolve({ code: error ? (typeof error.code === "number" ? error.code : -1) : 0, stderr }),
    );
  });
}

describe("the export of one effect", () => {
  it("is byte for byte the zip `skewsmith export --zip` writes for the same document and options", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "skewsmith-export-"));
    try {
      const name = "Harbour light";
      writeFileSync(path.join(dir, `${name}.json`), JSON.stringify(DOC));
      const cli = await run(
        path.join(ROOT, "node_modules/.bin/skewsmith"),
        ["export", `${name}.json`, "--zip", "cli.zip", "--outputs", "c,6502,json", "--sign", "scroll", "--dedupe"],
        dir,
      );
      expect(cli.stderr).toContain("label harbour_light");
      expect(cli.code).toBe(0);
      const plan = planEffectExport(source(name), query("outputs=c,6502,json&sign=scroll&dedupe=true"));
      expect(plan.fileName).toBe("harbour_light.zip");
      expect(Buffer.from(plan.build()).equals(readFileSync(path.join(dir, "cli.zip")))).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("uses the profile's label and dialects unless the query says otherwise", () => {
    const profile = { labelPrefix: "rose", dialects: ["6502"], exportOptions: {} };
    const files = (plan: ExportPlan) => Object.keys(unzipSync(plan.build())).sort();
    expect(files(planEffectExport(source("Compass", DOC, profile), {}))).toEqual([
      "README.txt",
      "rose_compass.6502.s",
      "rose_compass.effect.json",
    ]);
    expect(files(planEffectExport(source("Compass", DOC, profile), query("label=dial&outputs=c")))).toEqual([
      "README.txt",
      "dial.c",
      "dial.effect.json",
      "dial.h",
    ]);
  });

  it("validates the stored document again with core: a broken one is refused, never exported", () => {
    const error = problem(() => planEffectExport(source("Bad", { ...DOC, canvas: { width: 0, height: 16 } }), {}));
    expect(error.field).toBe("document");
    expect(error.message).toMatch(/canvas\.width: 0 is not allowed/);
  });

  it("answers an option this effect cannot use with a 400 naming the option (half of a table that is not antisymmetric)", () => {
    // An off-centre pivot makes the row table lose its antisymmetry (h[H−1−r] = −h[r] needs a centred pivot).
    const plan = planEffectExport(source("Lopsided", { ...DOC, pivot: { x: 3, y: 2.5 } }), query("half=true"));
    const error = problem(() => plan.build());
    expect(error.status).toBe(400);
    expect(error.field).toBe("half");
    expect(error.message).toMatch(/^Lopsided: half/);
  });

  it("has an ETag that changes with the document, the name, the options and the profile, and only with them", () => {
    const base = planEffectExport(source(), {}).etag;
    expect(base).toMatch(/^"[A-Za-z0-9_-]{32}"$/);
    expect(planEffectExport(source(), {}).etag).toBe(base);
    // Equivalent documents and queries: the same inputs once core has filled in the defaults and ordered the outputs.
    expect(planEffectExport(source("Harbour light", { ...DOC, rounding: "nearest-away", edges: "wrap" }), {}).etag).toBe(base);
    expect(planEffectExport(source(), query("outputs=c,6502")).etag).toBe(planEffectExport(source(), query("outputs=6502&outputs=c")).etag);
    const others = [
      planEffectExport(source("Harbour light", { ...DOC, pivot: { x: 12.5, y: 8 } }), {}).etag,
      planEffectExport(source("Harbour lamp"), {}).etag,
      planEffectExport(source(), query("outputs=c")).etag,
      planEffectExport(source(), query("sign=scroll")).etag,
      planEffectExport(source(), query("registerBits=8")).etag,
      planEffectExport(source(), query("split")).etag,
      planEffectExport(source(), query("half")).etag,
      planEffectExport(source(), query("dedupe")).etag,
      planEffectExport(source(), query("element=int32")).etag,
      planEffectExport(source(), query("label=lamp")).etag,
      planEffectExport(source("Harbour light", DOC, { labelPrefix: "quay", dialects: [], exportOptions: {} }), {}).etag,
      planEffectExport(source("Harbour light", DOC, { labelPrefix: "", dialects: ["6502"], exportOptions: {} }), {}).etag,
      planEffectExport(source("Harbour light", DOC, { labelPrefix: "", dialects: [], exportOptions: { registerBits: 10 } }), {}).etag,
    ];
    expect(new Set([base, ...others]).size).toBe(others.length + 1);
    // The same option from the profile or from the query makes the same bundle, so it has the same ETag.
    expect(
      planEffectExport(source("Harbour light", DOC, { labelPrefix: "", dialects: [], exportOptions: { sign: "scroll" } }), {}).etag,
    ).toBe(planEffectExport(source(), query("sign=scroll")).etag);
  });
});

describe("If-None-Match", () => {
  it("matches the ETag alone, in a list, as a weak tag, or *", () => {
    const tag = '"abc"';
    expect(etagMatches(null, tag)).toBe(false);
    expect(etagMatches('"abd"', tag)).toBe(false);
    expect(etagMatches('"abc"', tag)).toBe(true);
    expect(etagMatches('"x", "abc" ,"y"', tag)).toBe(true);
    expect(etagMatches('W/"abc"', tag)).toBe(true);
    expect(etagMatches("*", tag)).toBe(true);
    expect(etagMatches("abc", tag)).toBe(false);
  });

  it("answers 304 without building the bundle, and 200 with the zip otherwise", async () => {
    let builds = 0;
    const plan: ExportPlan = { etag: '"t1"', fileName: "x.zip", build: () => (builds++, new Uint8Array([80, 75, 5, 6])) };
    const fresh = exportResponse(new Request("http://app/x", { headers: { "If-None-Match": '"t1"' } }), plan);
    expect(fresh.status).toBe(304);
    expect(fresh.headers.get("ETag")).toBe('"t1"');
    expect(builds).toBe(0);
    const stale = exportResponse(new Request("http://app/x", { headers: { "If-None-Match": '"t0"' } }), plan);
    expect(stale.status).toBe(200);
    expect(stale.headers.get("Content-Type")).toBe("application/zip");
    expect(stale.headers.get("Content-Disposition")).toBe('attachment; filename="x.zip"');
    expect(stale.headers.get("Content-Length")).toBe("4");
    expect(new Uint8Array(await stale.arrayBuffer())).toEqual(new Uint8Array([80, 75, 5, 6]));
    expect(builds).toBe(1);
  });
});

describe("the export of a project", () => {
  async function project() {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const p = await makeProject(db, { team, actor: owner, name: "Lantern test quay" });
    const quay = await makeTargetProfile(db, { team, labelPrefix: "quay", dialects: ["6502", "c"] });
    return { owner, team, project: p, quay };
  }

  it("holds every live effect's own bundle in a folder named after its label, and a README", async () => {
    const { owner, project: p, quay } = await project();
    await makeEffect(db, { project: p, actor: owner, name: "Beacon", document: DOC, targetProfile: quay });
    await makeEffect(db, { project: p, actor: owner, name: "Anchor spin", document: { ...DOC, angles: { list: [0, 45, 90] } } });
    const gone = await makeEffect(db, { project: p, actor: owner, name: "Gone", document: DOC });
    await deleteEffect(db, { effectId: gone.id, actorId: owner.id });

    const sources = await projectExportSources(db, p);
    expect(sources.map((s) => s.effect.name)).toEqual(["Anchor spin", "Beacon"]);
    const plan = planProjectExport(p, sources, query("dedupe"));
    expect(plan.fileName).toBe("lantern-test-quay.zip");
    const zip = unzipSync(plan.build());
    const readme = strFromU8(zip["README.txt"]);
    expect(readme).toContain('"Lantern test quay"');
    expect(readme).toMatch(/anchor_spin\/\s+Anchor spin \(3 frames\)/);
    expect(readme).toMatch(/quay_beacon\/\s+Beacon \(6 frames\)/);

    // Each folder is exactly that effect's own bundle, as its own export makes it.
    for (const s of sources) {
      const own = unzipSync(planEffectExport(s, query("dedupe")).build());
      const label = s.effect.name === "Beacon" ? "quay_beacon" : "anchor_spin";
      const inFolder = Object.fromEntries(
        Object.entries(zip)
          .filter(([n]) => n.startsWith(`${label}/`))
          .map(([n, b]) => [n.slice(label.length + 1), b]),
      );
      expect(Object.keys(inFolder).sort()).toEqual(Object.keys(own).sort());
      for (const [n, bytes] of Object.entries(own)) expect(Buffer.from(inFolder[n]).equals(Buffer.from(bytes)), n).toBe(true);
    }
    expect(Object.keys(zip).filter((n) => n.startsWith("quay_beacon/"))).toEqual(
      expect.arrayContaining(["quay_beacon/quay_beacon.6502.s", "quay_beacon/quay_beacon.h", "quay_beacon/quay_beacon.c"]),
    );
    expect(Object.keys(zip).some((n) => n.includes("gone"))).toBe(false);
  });

  it("gives effects whose labels would repeat a numeric suffix, so their symbols stay apart", async () => {
    const { owner, project: p, quay } = await project();
    // Under one profile each effect's label has its own name after the prefix; labels repeat only when the query sets one.
    for (const name of ["Crane", "Buoy", "Ferry"])
      await makeEffect(db, { project: p, actor: owner, name, document: DOC, targetProfile: quay });
    const own = unzipSync(planProjectExport(p, await projectExportSources(db, p), {}).build());
    expect([...new Set(Object.keys(own).map((n) => n.split("/")[0]))].sort()).toEqual([
      "README.txt",
      "quay_buoy",
      "quay_crane",
      "quay_ferry",
    ]);
    const zip = unzipSync(planProjectExport(p, await projectExportSources(db, p), query("label=quay")).build());
    const folders = [...new Set(Object.keys(zip).map((n) => n.split("/")[0]))].sort();
    expect(folders).toEqual(["README.txt", "quay", "quay_2", "quay_3"]);
    expect(strFromU8(zip["quay_2/quay_2.h"])).toContain("quay_2_h");
    expect(strFromU8(zip["README.txt"])).toContain("numeric suffix (quay_2, quay_3)");
    // A label at core's length limit still gets its suffix within the limit.
    const long = planProjectExport(p, [source("A"), source("B")], query("label=abcdefghijklmnopqrstuvw"));
    expect(Object.keys(unzipSync(long.build()))).toContain("abcdefghijklmnopqrstu_2/abcdefghijklmnopqrstu_2.h");
  });

  it("refuses, before building anything, a project whose tables add up to more than 64 MiB, though each effect fits", () => {
    // 4096 × 4096 over 1500 frames: each effect's tables fit core's 32 MiB bundle limit, three of them do not fit 64 MiB.
    const big = {
      canvas: { width: 4096, height: 4096 },
      pivot: { x: 2048, y: 2048 },
      angles: { sweep: { from: 0, to: 360, frames: 1500 } },
    };
    const one = exportBudget(parseEffect(big), {}).totalBytes;
    expect(one).toBeLessThan(EXPORT_MAX_BYTES);
    expect(3 * one).toBeGreaterThan(PROJECT_EXPORT_MAX_BYTES);
    const plan = planProjectExport({ name: "Huge" }, [source("First", big), source("Second", big), source("Third", big)], {});
    const refused = problem(() => plan.build());
    expect(refused.status).toBe(400);
    expect(refused.message).toBe(
      `The project's tables come to more than ${PROJECT_EXPORT_MAX_BYTES} bytes (64 MiB) by Third; a project zip holds at most that. Export the biggest effects on their own, or use dedupe or half tables.`,
    );
  });

  it("changes its ETag when any effect is saved, and a project without effects exports only its README", async () => {
    const { owner, project: p } = await project();
    const empty = planProjectExport(p, await projectExportSources(db, p), {});
    expect(Object.keys(unzipSync(empty.build()))).toEqual(["README.txt"]);
    const effect = await makeEffect(db, { project: p, actor: owner, name: "Lamp", document: DOC });
    const before = planProjectExport(p, await projectExportSources(db, p), {}).etag;
    expect(before).not.toBe(empty.etag);
    expect(planProjectExport(p, await projectExportSources(db, p), {}).etag).toBe(before);
    await saveEffectDocument(db, { effectId: effect.id, expectedVersion: 1, actorId: owner.id, document: { ...DOC, edges: "clip" } });
    expect(planProjectExport(p, await projectExportSources(db, p), {}).etag).not.toBe(before);
  });
});

describe("an effect's export source", () => {
  it("comes with the effect's target profile, or none", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const p = await makeProject(db, { team, actor: owner });
    const profile = await makeTargetProfile(db, { team, labelPrefix: "pier" });
    const withProfile = await makeEffect(db, { project: p, actor: owner, targetProfile: profile });
    const without = await makeEffect(db, { project: p, actor: owner });
    expect((await effectExportSource(db, withProfile)).profile).toMatchObject({ labelPrefix: profile.labelPrefix });
    expect((await effectExportSource(db, without)).profile).toBeNull();
    const label = profileLabel("pier", withProfile.name);
    expect(planEffectExport(await effectExportSource(db, withProfile), {}).fileName).toBe(`${label}.zip`);
    // The saved document is what is exported.
    const bundle = exportBundle(parseEffect(withProfile.document), { name: withProfile.name, label });
    expect(Buffer.from(planEffectExport(await effectExportSource(db, withProfile), {}).build()).equals(Buffer.from(bundle.zip))).toBe(true);
  });
});
