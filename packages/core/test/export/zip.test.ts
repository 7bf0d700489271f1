import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { unzipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { FFLATE_ZIP_CODEC, zipArchive, zipArchiveAsync, zipWriter, type ZipSource } from "../../src/export/zip.ts";
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

  it("gives the same bytes adding files one by one (zipWriter), in any order, as zipArchive of them", async () => {
    // More texts than the writer's two buffers, added in turn to buffers 0, 1, 0, 1, 0: the third and fourth are
    // smaller than the buffer they reuse (so they wait for its deflate), the fifth larger (so it grows). Files given by
    // their bytes come between them.
    const lines = [600, 200, 400, 800, 300];
    const text = (i: number): ZipSource => ({
      name: `t${i}.s`,
      bytes: new Uint8Array(0),
      // Values that hardly compress, so that each deflate spans several of zlib's output chunks (and callbacks).
      pieces: {
        pieces: Array.from(
          { length: lines[i] * 200 },
          (_, j) => `        .word   $${(Math.imul(j + 1, 0x9e3779b1 + i) >>> 12).toString(16)} ; ✓`,
        ),
        separator: "\n",
      },
    });
    const all: ZipSource[] = [files[0], text(0), text(1), files[1], text(2), text(3), files[2], text(4)];
    const order = [3, 1, 0, 4, 2, 7, 5, 6];
    const writer = zipWriter(date);
    for (const i of order) await writer.add(i, all[i]);
    const zip = await writer.finish();
    // Compared as buffers: a failing toEqual of megabytes would take minutes to print.
    expect(Buffer.from(zip).equals(Buffer.from(zipArchive(all, date)))).toBe(true);
    const back = unzipSync(zip);
    expect(new TextDecoder().decode(back["t4.s"])).toBe(all[7].pieces!.pieces.join("\n"));
  });

  it("refuses a file number given twice or left out, naming the allowed numbers", async () => {
    const twice = zipWriter(date);
    await twice.add(0, files[0]);
    expect(() => twice.add(0, files[1])).toThrow("zip: file number 0 is not allowed; allowed a whole number from 0, each once");
    expect(() => twice.add(-1, files[1])).toThrow("zip: file number -1 is not allowed");
    const gap = zipWriter(date);
    await gap.add(0, files[0]);
    await gap.add(2, files[2]);
    await expect(gap.finish()).rejects.toThrow("zip: file number 1 was never added; allowed numbers with no gap from 0");
  });

  it("gives the same bytes for the same files (a fixed date, no clock)", () => {
    expect(Buffer.from(zipArchive(files, date)).equals(Buffer.from(zipArchive(files, date)))).toBe(true);
  });
});
