import { placeTables, type ExportLayout } from "./layout.ts";

/** Byte orders of the raw binary export. */
export type ByteOrder = "little" | "big";

/**
 * The tables as raw bytes in the given byte order, in layout order (h, v, flip, alpha, beta, then frame), each table
 * starting at a multiple of its element size with zero padding before it: the layout of the 68k and ARM `.rodata`.
 */
export function binaryExport(layout: ExportLayout, order: ByteOrder): Uint8Array {
  const { placements, bytes } = placeTables(layout.tables, true);
  const out = new Uint8Array(bytes);
  const view = new DataView(out.buffer);
  const little = order === "little";
  const put = (values: readonly number[], at: number, size: number, signed: boolean) => {
    for (const v of values) {
      if (size === 1) signed ? view.setInt8(at, v) : view.setUint8(at, v);
      else if (size === 2) signed ? view.setInt16(at, v, little) : view.setUint16(at, v, little);
      else signed ? view.setInt32(at, v, little) : view.setUint32(at, v, little);
      at += size;
    }
  };
  for (const { table: t, offset } of placements) {
    const { bytes: size, signed } = t.type;
    if (t.rows === null) {
      put(t.values, offset, size, signed);
      continue;
    }
    // Each distinct row is encoded once, then copied to every frame that shares it.
    const encoded = new Map<readonly number[], Uint8Array>();
    let at = offset;
    for (const row of t.rows) {
      const length = row.length * size;
      const first = encoded.get(row);
      if (first) out.copyWithin(at, first.byteOffset, first.byteOffset + length);
      else {
        put(row, at, size, signed);
        encoded.set(row, out.subarray(at, at + length));
      }
      at += length;
    }
  }
  return out;
}
