import { placeTables, type ExportLayout } from "./layout.ts";

/** Byte orders of the raw binary export. */
export type ByteOrder = "little" | "big";

/** Whether this machine stores the low byte of a multi-byte value first. */
const HOST_LITTLE_ENDIAN = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;

/**
 * The tables as raw bytes in the given byte order, in layout order (h, v, flip, alpha, beta, then frame), each table
 * starting at a multiple of its element size with zero padding before it: the layout of the 68k and ARM `.rodata`.
 */
export function binaryExport(layout: ExportLayout, order: ByteOrder): Uint8Array {
  const { placements, bytes } = placeTables(layout.tables, true);
  const out = new Uint8Array(bytes);
  const view = new DataView(out.buffer);
  const little = order === "little";
  // Where the machine's own order is the one asked for, a table is stored through a typed array over the output (every
  // table starts at a multiple of its element size): the same bytes as DataView's setters, element by element, since
  // both convert a value modulo 2^(8·size).
  const native = little === HOST_LITTLE_ENDIAN;
  const put = (values: readonly number[], at: number, size: number, signed: boolean) => {
    if (size === 1) {
      out.set(values, at);
      return;
    }
    if (native) {
      if (size === 2) new (signed ? Int16Array : Uint16Array)(out.buffer, at, values.length).set(values);
      else new (signed ? Int32Array : Uint32Array)(out.buffer, at, values.length).set(values);
      return;
    }
    for (const v of values) {
      if (size === 2) signed ? view.setInt16(at, v, little) : view.setUint16(at, v, little);
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
