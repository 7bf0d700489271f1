import type { Edges } from "./limits.ts";

/** One element per pixel: palette indices (Uint8Array) or packed RGBA words (Uint32Array); 0 is the background. */
export type PixelData = Uint8Array | Uint16Array | Uint32Array;

/** A canvas-sized plane of pixels, row-major, `width` × `height` elements. */
export interface Plane<T extends PixelData = PixelData> {
  readonly width: number;
  readonly height: number;
  readonly data: T;
}

/** What a render needs of a frame: the half-turn flip and the row (h) and column (v) shift tables in whole pixels. */
export interface FrameShifts {
  readonly flip: boolean;
  readonly h: ArrayLike<number>;
  readonly v: ArrayLike<number>;
}

/** What a render needs of an effect: canvas size (pixels), pivot (pixels, multiple of 0.5) and the edge rule. */
export interface RenderGeometry {
  readonly canvas: { readonly width: number; readonly height: number };
  readonly pivot: { readonly x: number; readonly y: number };
  readonly edges: Edges;
}

/** Which pass a render stops after: 1 = flip and first row pass, 2 = column pass, 3 = second row pass (the frame). */
export type PassNumber = 1 | 2 | 3;

type Ctor<T extends PixelData> = { new (length: number): T };

const mod = (x: number, n: number) => ((x % n) + n) % n;

/**
 * Strips of the column pass. The gather for one output row reads one source row per distinct shift in its strip, so a
 * strip is cut at this many bytes of row or this many rows of spread in its shifts, whichever comes first. Measured on a
 * 4K RGBA frame (bench/render.bench.ts): 1024-pixel strips were fastest at 7° and 30°, and at 80° spans of about 640 rows;
 * wider or taller ones took up to twice as long per pixel, narrower ones lost to per-strip overhead.
 */
const STRIP_BYTES = 4096;
const STRIP_SPAN_ROWS = 640;

/**
 * Draws frames exactly as the target does (spec §5), reusing two scratch planes and a few per-line tables across calls.
 *
 * Rows move as block copies. The column pass is a row-major gather, dst[r][c] = src[r − v[c]][c], in strips of columns;
 * a full render also applies the second row pass while it stores, so the frame takes one copy and one gather.
 */
export class Renderer<T extends PixelData> {
  readonly width: number;
  readonly height: number;
  private readonly a: T;
  /** The second own plane, made on the first render that needs it (renderInto never does). */
  private bPlane: T | null = null;
  private readonly type: Ctor<T>;
  /** The gather from plane a into plane b: this renderer's own compiled copy of the loop (see ownGather). */
  private ownGather: Gather | null | undefined = undefined;
  /** Per column c: its shift t reduced into [−H, H] (wrap: the remainder of v[c] by H; clip: clamped). */
  private readonly colShift: Int32Array;
  /** Per column c: c − t·W; adding r·W gives the index of the source pixel that row r of column c takes. */
  private readonly colOff: Int32Array;
  private readonly stripWidth: number;

  /** Makes a renderer for `width` × `height` planes of the given element type (Uint8Array for indices, Uint32Array for RGBA). */
  constructor(width: number, height: number, type: Ctor<T>) {
    this.width = width;
    this.height = height;
    this.type = type;
    this.a = new type(width * height);
    this.colShift = new Int32Array(width);
    this.colOff = new Int32Array(width);
    this.stripWidth = Math.max(16, STRIP_BYTES / this.a.BYTES_PER_ELEMENT);
  }

  /**
   * Renders `src` through the frame up to pass `pass` and returns one of the renderer's own planes:
   * valid until the next call, copy it to keep it.
   */
  render(src: T, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3): T {
    this.check(src, frame, geometry);
    const clip = geometry.edges === "clip";
    this.bPlane ??= new this.type(this.width * this.height);
    const b = this.bPlane;
    // Write pass 1 into whichever own plane `src` is not, so feeding a returned plane back in is safe.
    const first = src === this.a ? b : this.a;
    const second = first === this.a ? b : this.a;
    this.firstRows(src, first, frame, geometry, clip);
    if (pass === 1) return first;
    this.gather(first, second, frame.v, pass === 3 ? frame.h : undefined, clip);
    return second;
  }

  /**
   * Renders `src` through the frame up to pass `pass` straight into `dst`, a canvas-sized plane of the caller's apart from
   * `src`: the last pass stores into it, so nothing is copied afterwards. Hot loop: writes `dst`.
   */
  renderInto(src: T, dst: T, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3): void {
    this.check(src, frame, geometry, dst);
    const clip = geometry.edges === "clip";
    if (pass === 1) {
      this.firstRows(src, dst, frame, geometry, clip);
      return;
    }
    const own = this.a;
    if (own === src || own === dst) throw new RangeError("source or destination: is the renderer's own plane; pass a plane of your own");
    this.firstRows(src, own, frame, geometry, clip);
    this.gather(own, dst, frame.v, pass === 3 ? frame.h : undefined, clip);
  }

  /** Pass 1 alone (flip and first row pass) from `src` into `dst`, both canvas-sized and apart. Hot loop: writes `dst`. */
  rowPass(src: T, dst: T, frame: FrameShifts, geometry: RenderGeometry): void {
    this.check(src, frame, geometry, dst);
    this.firstRows(src, dst, frame, geometry, geometry.edges === "clip");
  }

  /** Pass 2 alone (columns by v) from `src` into `dst`, both canvas-sized and apart. Hot loop: writes `dst`. */
  columnPass(src: T, dst: T, frame: FrameShifts, geometry: RenderGeometry): void {
    this.check(src, frame, geometry, dst);
    this.gather(src, dst, frame.v, undefined, geometry.edges === "clip");
  }

  /** Pass 3 alone (rows by h, indexed by the row reached) from `src` into `dst`, both canvas-sized and apart. Hot loop: writes `dst`. */
  secondRowPass(src: T, dst: T, frame: FrameShifts, geometry: RenderGeometry): void {
    this.check(src, frame, geometry, dst);
    this.rows(src, dst, frame.h, geometry.edges === "clip");
  }

  private check(src: T, frame: FrameShifts, geometry: RenderGeometry, dst?: T): void {
    const { width: W, height: H } = this;
    if (geometry.canvas.width !== W || geometry.canvas.height !== H)
      throw new RangeError(`canvas: ${geometry.canvas.width}×${geometry.canvas.height} does not match the renderer's ${W}×${H}`);
    if (src.length !== W * H) throw new RangeError(`source: ${src.length} pixels, expected ${W}×${H} = ${W * H}`);
    if (frame.h.length !== H || frame.v.length !== W)
      throw new RangeError(`frame: tables of ${frame.h.length} rows and ${frame.v.length} columns, expected ${H} and ${W}`);
    if (dst !== undefined) {
      if (dst.length !== W * H) throw new RangeError(`destination: ${dst.length} pixels, expected ${W}×${H} = ${W * H}`);
      if (dst.buffer === src.buffer && dst.byteOffset < src.byteOffset + src.byteLength && src.byteOffset < dst.byteOffset + dst.byteLength)
        throw new RangeError("destination: shares memory with the source; a pass needs two separate planes");
    }
  }

  private firstRows(src: T, dst: T, frame: FrameShifts, geometry: RenderGeometry, clip: boolean): void {
    if (frame.flip) this.flipRows(src, dst, frame.h, Math.round(geometry.pivot.x * 2), Math.round(geometry.pivot.y * 2), clip);
    else this.rows(src, dst, frame.h, clip);
  }

  /** Row pass: dst[r][c + h[r]] = src[r][c], as one or two block copies per row. */
  private rows(src: T, dst: T, h: ArrayLike<number>, clip: boolean): void {
    const W = this.width;
    for (let r = 0, o = 0; r < this.height; r++, o += W) {
      const s = h[r];
      if (clip) {
        if (s >= W || s <= -W) {
          dst.fill(0, o, o + W);
        } else if (s >= 0) {
          dst.fill(0, o, o + s);
          dst.set(src.subarray(o, o + W - s), o + s);
        } else {
          dst.set(src.subarray(o - s, o + W), o);
          dst.fill(0, o + W + s, o + W);
        }
      } else {
        const k = mod(s, W);
        if (k === 0) dst.set(src.subarray(o, o + W), o);
        else {
          dst.set(src.subarray(o, o + W - k), o + k);
          dst.set(src.subarray(o + W - k, o + W), o);
        }
      }
    }
  }

  /** Half-turn flip and first row pass in one sweep: source row r lands reversed on row P2y−1−r, shifted by h there. */
  private flipRows(src: T, dst: T, h: ArrayLike<number>, p2x: number, p2y: number, clip: boolean): void {
    const W = this.width;
    const H = this.height;
    if (clip) dst.fill(0);
    for (let r = 0, so = 0; r < H; r++, so += W) {
      let rf = p2y - 1 - r;
      if (rf < 0 || rf >= H) {
        if (clip) continue;
        rf = mod(rf, H);
      }
      // Column c goes to cf = P2x−1−c, then to c1 = cf + h[rf] = k − c.
      const k = p2x - 1 + h[rf];
      if (clip) {
        // Both cf and c1 must stay inside the canvas.
        const lo = Math.max(0, p2x - W, k - W + 1);
        const hi = Math.min(W - 1, p2x - 1, k);
        if (lo <= hi) reverseCopy(src, dst, so + lo, so + hi + 1, rf * W + k - lo);
      } else {
        // c1 = (k − c) mod W: columns 0 … m land on m … 0, the rest on W−1 … m+1.
        const m = mod(k, W);
        const ro = rf * W;
        reverseCopy(src, dst, so, so + m + 1, ro + m);
        reverseCopy(src, dst, so + m + 1, so + W, ro + W - 1);
      }
    }
  }

  /**
   * Column pass, dst[r][c] = src[r − v[c]][c] with the edge rule, as a row-major gather in strips of columns. With `h`
   * it also does the second row pass while storing: row r of the result is written shifted by h[r] (spec §5 step 4).
   */
  private gather(src: T, dst: T, v: ArrayLike<number>, h: ArrayLike<number> | undefined, clip: boolean): void {
    const W = this.width;
    const H = this.height;
    const { colShift, colOff } = this;
    for (let c = 0; c < W; c++) {
      const s = v[c];
      // Shifts of H or more empty the column (clip) or go round once more (wrap); either way t stays in [−H, H].
      const t = clip ? (s >= H ? H : s <= -H ? -H : s) : s % H;
      colShift[c] = t;
      colOff[c] = c - t * W;
    }
    const own = src === this.a && dst === this.bPlane;
    if (own && this.ownGather === undefined) this.ownGather = ownGather(src, dst, colOff);
    const run = own && this.ownGather ? this.ownGather : gatherFor(src, dst, colOff);
    for (let c0 = 0; c0 < W;) {
      // Grow the strip while it stays narrow enough and its shifts span few enough source rows.
      let tMin = colShift[c0];
      let tMax = tMin;
      let rising = true;
      let falling = true;
      let c1 = c0 + 1;
      for (; c1 < W && c1 - c0 < this.stripWidth; c1++) {
        const t = colShift[c1];
        const lo = t < tMin ? t : tMin;
        const hi = t > tMax ? t : tMax;
        if (hi - lo > STRIP_SPAN_ROWS) break;
        tMin = lo;
        tMax = hi;
        if (t < colShift[c1 - 1]) rising = false;
        if (t > colShift[c1 - 1]) falling = false;
      }
      const strip: Strip = { tMin, tMax, order: rising ? 1 : falling ? -1 : 0 };
      for (let r = 0, o = 0; r < H; r++, o += W) {
        if (h === undefined) {
          this.piece(src, dst, run, strip, r, o, c0, c1, clip);
          continue;
        }
        const s = h[r];
        if (clip) {
          // Columns that the second row pass moves off the canvas are dropped; the uncovered part is filled below.
          if (s >= W || s <= -W) continue;
          const lo = s < 0 ? -s : 0;
          const hi = s > 0 ? W - s : W;
          this.piece(src, dst, run, strip, r, o + s, lo > c0 ? lo : c0, hi < c1 ? hi : c1, clip);
        } else {
          const k = mod(s, W);
          const split = W - k;
          this.piece(src, dst, run, strip, r, o + k, c0, split < c1 ? split : c1, clip);
          this.piece(src, dst, run, strip, r, o + k - W, split > c0 ? split : c0, c1, clip);
        }
      }
      c0 = c1;
    }
    if (h !== undefined && clip) {
      for (let r = 0, o = 0; r < H; r++, o += W) {
        const s = h[r];
        if (s >= W || s <= -W) dst.fill(0, o, o + W);
        else if (s > 0) dst.fill(0, o, o + s);
        else if (s < 0) dst.fill(0, o + W + s, o + W);
      }
    }
  }

  /**
   * Row r, columns a … b−1 of a strip, stored at dst[d + c]. Column c reads source row q = r − t; q below 0 or from H up
   * crossed an edge: wrap reads row q ± H, clip stores 0. Where the strip's shifts run one way the columns of each kind
   * are one range, found by bisection, so every range is a plain gather.
   */
  private piece(src: T, dst: T, run: Gather, strip: Strip, r: number, d: number, a: number, b: number, clip: boolean): void {
    if (a >= b) return;
    const H = this.height;
    const N = this.width * H;
    const o = r * this.width;
    const { tMin, tMax } = strip;
    if (r - tMax >= 0 && r - tMin < H) run(o, d, a, b);
    else if (r - tMin < 0 || r - tMax >= H) {
      // Every column crossed the same edge.
      if (clip) dst.fill(0, d + a, d + b);
      else run(r - tMin < 0 ? o + N : o - N, d, a, b);
    } else if (strip.order === 0) this.mixed(src, dst, o, d, a, b, clip);
    else {
      // Rising shifts: q falls along the row, so the columns go q ≥ H, then inside, then q < 0; falling: the reverse.
      const rising = strip.order > 0;
      const b1 = firstPast(this.colShift, a, b, rising ? r - H : r, rising);
      const b2 = firstPast(this.colShift, b1, b, rising ? r : r - H, rising);
      const before = rising ? o - N : o + N;
      const after = rising ? o + N : o - N;
      if (clip) {
        dst.fill(0, d + a, d + b1);
        dst.fill(0, d + b2, d + b);
      } else {
        run(before, d, a, b1);
        run(after, d, b2, b);
      }
      run(o, d, b1, b2);
    }
  }

  /** The same gather for columns whose shifts go both ways: each pixel checks its own source row. */
  private mixed(src: T, dst: T, o: number, d: number, a: number, b: number, clip: boolean): void {
    const N = this.width * this.height;
    const colOff = this.colOff;
    if (clip) {
      for (let c = a; c < b; c++) {
        const j = o + colOff[c];
        dst[d + c] = j >>> 0 < N ? src[j] : 0;
      }
    } else {
      for (let c = a; c < b; c++) {
        let j = o + colOff[c];
        if (j < 0) j += N;
        else if (j >= N) j -= N;
        dst[d + c] = src[j];
      }
    }
  }
}

/** A strip of columns of the column pass: the least and greatest reduced shift, and whether shifts only rise (1) or fall (−1). */
interface Strip {
  readonly tMin: number;
  readonly tMax: number;
  readonly order: 1 | -1 | 0;
}

/** dst[d + c] = src[base + colOff[c]] for c in [a, b): one range of the column pass, over planes fixed by the closure. */
type Gather = (base: number, d: number, a: number, b: number) => void;

/**
 * The gather over two planes, one loop per element type: each of these closures only ever sees one kind of typed array,
 * so its loop stays monomorphic however many renderers (of whatever kinds) the process has, and it is made anew for
 * every column pass, so its speed never depends on V8 specialising a single closure to its arrays (the renderer before
 * issue 10 did that: its first renderer ran up to 1.8 times faster than a second one). Hot loops, unrolled by 8.
 */
function gatherFor<T extends PixelData>(src: T, dst: T, colOff: Int32Array): Gather {
  if (dst instanceof Uint32Array) return gather32(src as Uint32Array, dst, colOff);
  if (dst instanceof Uint8Array) return gather8(src as Uint8Array, dst, colOff);
  return gatherAny(src, dst, colOff);
}

function gather32(src: Uint32Array, dst: Uint32Array, colOff: Int32Array): Gather {
  return (base, d, a, b) => {
    let c = a;
    for (; c + 7 < b; c += 8) {
      const p = d + c;
      dst[p] = src[base + colOff[c]];
      dst[p + 1] = src[base + colOff[c + 1]];
      dst[p + 2] = src[base + colOff[c + 2]];
      dst[p + 3] = src[base + colOff[c + 3]];
      dst[p + 4] = src[base + colOff[c + 4]];
      dst[p + 5] = src[base + colOff[c + 5]];
      dst[p + 6] = src[base + colOff[c + 6]];
      dst[p + 7] = src[base + colOff[c + 7]];
    }
    for (; c < b; c++) dst[d + c] = src[base + colOff[c]];
  };
}

function gather8(src: Uint8Array, dst: Uint8Array, colOff: Int32Array): Gather {
  return (base, d, a, b) => {
    let c = a;
    for (; c + 7 < b; c += 8) {
      const p = d + c;
      dst[p] = src[base + colOff[c]];
      dst[p + 1] = src[base + colOff[c + 1]];
      dst[p + 2] = src[base + colOff[c + 2]];
      dst[p + 3] = src[base + colOff[c + 3]];
      dst[p + 4] = src[base + colOff[c + 4]];
      dst[p + 5] = src[base + colOff[c + 5]];
      dst[p + 6] = src[base + colOff[c + 6]];
      dst[p + 7] = src[base + colOff[c + 7]];
    }
    for (; c < b; c++) dst[d + c] = src[base + colOff[c]];
  };
}

/** The unrolled gather loop of gather32 and gather8, as source text for ownGather. */
const GATHER_SOURCE = `return (base, d, a, b) => {
  let c = a;
  for (; c + 7 < b; c += 8) {
    const p = d + c;
    dst[p] = src[base + colOff[c]];
    dst[p + 1] = src[base + colOff[c + 1]];
    dst[p + 2] = src[base + colOff[c + 2]];
    dst[p + 3] = src[base + colOff[c + 3]];
    dst[p + 4] = src[base + colOff[c + 4]];
    dst[p + 5] = src[base + colOff[c + 5]];
    dst[p + 6] = src[base + colOff[c + 6]];
    dst[p + 7] = src[base + colOff[c + 7]];
  }
  for (; c < b; c++) dst[d + c] = src[base + colOff[c]];
};`;

/**
 * The gather over a renderer's own two planes, compiled from source for that renderer alone: a function of its own,
 * whose only closure holds that renderer's planes, so V8 compiles them in as constants (no reloads or range checks of
 * the arrays in the loop). The renderer before issue 10 had this for its first renderer only (one function shared by
 * all, specialised while a process had one renderer: a second made both up to 1.8 times slower); here every renderer
 * has its own, and a second renderer changes nothing of the first's. Where source cannot be compiled at run time (a
 * page whose content security policy forbids it), null: the renderer uses the shared loops above.
 */
function ownGather<T extends PixelData>(src: T, dst: T, colOff: Int32Array): Gather | null {
  try {
    return new Function("src", "dst", "colOff", GATHER_SOURCE)(src, dst, colOff) as Gather;
  } catch {
    return null;
  }
}

/** Any other element type (16-bit planes): one plain loop. */
function gatherAny<T extends PixelData>(src: T, dst: T, colOff: Int32Array): Gather {
  return (base, d, a, b) => {
    for (let c = a; c < b; c++) dst[d + c] = src[base + colOff[c]];
  };
}

/** The first column in [a, b) whose shift is past `limit`: above it when shifts rise, at or below it when they fall. */
function firstPast(t: Int32Array, a: number, b: number, limit: number, rising: boolean): number {
  let lo = a;
  let hi = b;
  while (lo < hi) {
    const m = (lo + hi) >> 1;
    if (rising ? t[m] > limit : t[m] <= limit) hi = m;
    else lo = m + 1;
  }
  return lo;
}

/** Below this many pixels a reversed row segment is copied element by element: cheaper than two views and two builtins. */
const SHORT_REVERSE = 64;

/** dst[d], dst[d − 1], … = src[from], src[from + 1], … up to src[to − 1]: one row segment turned back to front. */
function reverseCopy<T extends PixelData>(src: T, dst: T, from: number, to: number, d: number): void {
  const n = to - from;
  if (n >= SHORT_REVERSE) {
    // A block copy, then the builtin reverse in place: about three times a JS loop's speed on a 4K row.
    dst.set(src.subarray(from, to), d - n + 1);
    dst.subarray(d - n + 1, d + 1).reverse();
    return;
  }
  for (let i = from, j = d; i < to; i++, j--) dst[j] = src[i];
}
