// What the issue says each exported label must hold, computed straight from the reference frames (test/helpers/reference.ts,
// the spec's words in plain BigInt and 60-digit arithmetic) and the export options as the issue words them; the exporters
// are checked against this through the real tools.

/** What the expected labels are computed from: the effect's canvas and format, and every frame's tables. */
export interface ExpectedSource {
  readonly effect: { readonly canvas: { readonly width: number; readonly height: number }; readonly fixedPoint: { readonly bits: number } };
  readonly frames: readonly {
    readonly index: number;
    readonly flip: boolean;
    readonly alpha: number;
    readonly beta: number;
    readonly h: readonly number[];
    readonly v: readonly number[];
  }[];
}

export interface ExpectedTable {
  readonly name: string;
  /** 2 for the per-frame tables h and v ([frame][entry]), 1 for the others. */
  readonly dims: 1 | 2;
  readonly bytes: 1 | 2 | 4;
  readonly signed: boolean;
  readonly values: readonly number[];
}

export interface ExpectedOptions {
  readonly label: string;
  readonly sign: "shift" | "scroll";
  readonly registerBits: number | null;
  /** The h/v element type the case expects (by the case's own reasoning, not by the exporter). */
  readonly element: "int8" | "uint8" | "int16" | "uint16" | "int32" | "uint32";
  readonly split: boolean;
  readonly half: boolean;
  readonly dedupe: boolean;
}

const WIDTH = { int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4 } as const;

/** A shift as the issue says it is exported: negated for "scroll", then wrapped as an unsigned N-bit register value. */
export function exported(s: number, o: Pick<ExpectedOptions, "sign" | "registerBits">): number {
  let x = o.sign === "scroll" ? -s : s;
  if (o.registerBits !== null) {
    const m = 2 ** o.registerBits;
    x = ((x % m) + m) % m;
  }
  return x === 0 ? 0 : x;
}

function antisymmetric(tables: (readonly number[])[]): boolean {
  return tables.every((t) => t.every((x, i) => t[t.length - 1 - i] === -x));
}

/** Every label with its values, in the order the issue gives (h, v, flip, alpha, beta, then the frame index), split into lo/hi bytes where asked. */
export function expectedTables(doc: ExpectedSource, o: ExpectedOptions): ExpectedTable[] {
  const frames = doc.frames;
  let stored = frames.map((f) => f.index);
  let index: number[] | null = null;
  if (o.dedupe) {
    const keys: string[] = [];
    stored = [];
    index = frames.map((f) => {
      const key = JSON.stringify([f.h, f.v, f.flip, f.alpha, f.beta]);
      let u = keys.indexOf(key);
      if (u < 0) {
        u = keys.push(key) - 1;
        stored.push(f.index);
      }
      return u;
    });
  }
  const halfH = o.half && antisymmetric(frames.map((f) => f.h));
  const halfV = o.half && antisymmetric(frames.map((f) => f.v));
  const H = doc.effect.canvas.height;
  const W = doc.effect.canvas.width;
  const hN = halfH ? Math.ceil(H / 2) : H;
  const vN = halfV ? Math.ceil(W / 2) : W;
  const elem = { bytes: WIDTH[o.element], signed: o.element.startsWith("int") };
  const coef = { bytes: (doc.effect.fixedPoint.bits / 8) as 1 | 2 | 4, signed: true };
  const L = o.label;
  const whole: ExpectedTable[] = [
    { name: `${L}_h`, dims: 2, ...elem, values: stored.flatMap((i) => frames[i].h.slice(0, hN).map((s) => exported(s, o))) },
    { name: `${L}_v`, dims: 2, ...elem, values: stored.flatMap((i) => frames[i].v.slice(0, vN).map((s) => exported(s, o))) },
    { name: `${L}_flip`, dims: 1, bytes: 1, signed: false, values: stored.map((i) => (frames[i].flip ? 1 : 0)) },
    { name: `${L}_alpha`, dims: 1, ...coef, values: stored.map((i) => frames[i].alpha) },
    { name: `${L}_beta`, dims: 1, ...coef, values: stored.map((i) => frames[i].beta) },
  ];
  if (index) whole.push({ name: `${L}_frame`, dims: 1, bytes: stored.length <= 256 ? 1 : 2, signed: false, values: index });
  if (!o.split) return whole;
  return whole.flatMap((t) => {
    if (t.bytes !== 2) return [t];
    const u16 = t.values.map((x) => (x + 65536) % 65536);
    return [
      { name: `${t.name}_lo`, dims: t.dims, bytes: 1, signed: false, values: u16.map((x) => x % 256) },
      { name: `${t.name}_hi`, dims: t.dims, bytes: 1, signed: false, values: u16.map((x) => Math.floor(x / 256)) },
    ];
  });
}

/** The `<stdint.h>` type of a table's elements. */
export function cType(t: Pick<ExpectedTable, "bytes" | "signed">): string {
  return `${t.signed ? "" : "u"}int${t.bytes * 8}_t`;
}

/** A table's values as bytes in the given byte order (two's complement for signed values), written with DataView. */
export function encode(t: ExpectedTable, little: boolean): Uint8Array {
  const out = new Uint8Array(t.values.length * t.bytes);
  const view = new DataView(out.buffer);
  t.values.forEach((v, i) => {
    const at = i * t.bytes;
    if (t.bytes === 1) t.signed ? view.setInt8(at, v) : view.setUint8(at, v);
    else if (t.bytes === 2) t.signed ? view.setInt16(at, v, little) : view.setUint16(at, v, little);
    else t.signed ? view.setInt32(at, v, little) : view.setUint32(at, v, little);
  });
  return out;
}
