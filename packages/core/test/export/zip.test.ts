import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { unzipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { FFLATE_ZIP_CODEC, zipArchive, zipArchiveAsync } from "../../src/export/zip.ts";
import { run, runBytes } from "./toolchain.ts";

describe("zipArchive", () => {
  const files = [
    { name: "README.txt", bytes: new TextEncoder().encode("tables\n".repeat(500)) },
    { name: "t.le.bin", bytes: Uint8Array.from({ length: 70_000 }, (_, i) => (i * 7) & 255) },
    { name: "empty.s", bytes: new Uint8Array(0) },
  ];
  const date = new Date(1980, 0, 1, 0, 0, 0);

  it.each([
    ["Node's zlib (the command line, the app's server)", undefined],
    ["fflate (a platform without Node's zlib)", FFLATE_ZIP_CODEC],
  ] as const)("with %s: unzip tests it and gives back every file's bytes, in order", (_name, codec) => {
    const zip = zipArchive(files, date, codec);
    const dir = mkdtempSync(join(tmpdir(), "skewsmith-zip-"));
    try {
      writeFileSync(join(dir, "b.zip"), zip);
      run("unzip", ["-tq", "b.zip"], dir, false); // Info-ZIP checks every entry's CRC
      expect(run("unzip", ["-Z1", "b.zip"], dir).trim().split("\n")).toEqual(files.map((f) => f.name));
      for (const f of files) expect(Buffer.from(runBytes("unzip", ["-p", "b.zip", f.name], dir)).equals(Buffer.from(f.bytes))).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    const back = unzipSync(zip);
    for (const f of files) expect(Buffer.from(back[f.name]).equals(Buffer.from(f.bytes))).toBe(true);
  });

  it("gives the same bytes for a text given as pieces as for its UTF-8 bytes, non-ASCII text and empty pieces included", () => {
    const pieces = ["; table h", "        .byte   $01, $FF", "", "; ré-échelle ✓ 𝄞", "end"];
    const text = pieces.join("\n");
    const asBytes = zipArchive([files[0], { name: "a.s", bytes: new TextEncoder().encode(text) }, files[2]], date);
    const asPieces = zipArchive([files[0], { name: "a.s", bytes: new Uint8Array(0), pieces: { pieces, separator: "\n" } }, files[2]], date);
    expect(asPieces).toEqual(asBytes);
    expect(new TextDecoder().decode(unzipSync(asPieces)["a.s"])).toBe(text);
  });

  it("gives the same bytes deflating on Node's thread pool (zipArchiveAsync) as in one go, files as pieces or bytes", async () => {
    const many = Array.from({ length: 5 }, (_, i) => ({
      name: `t${i}.s`,
      bytes: new Uint8Array(0),
      pieces: {
        pieces: Array.from({ length: 300 }, (_, j) => `        .word   $${((i * 977 + j * 31) & 0xffff).toString(16)}`),
        separator: "\n",
      },
    }));
    const all = [...files, ...many];
    expect(await zipArchiveAsync(all, date)).toEqual(zipArchive(all, date));
  });

  it("gives the same bytes for the same files (a fixed date, no clock)", () => {
    expect(Buffer.from(zipArchive(files, date)).equals(Buffer.from(zipArchive(files, date)))).toBe(true);
  });
});
