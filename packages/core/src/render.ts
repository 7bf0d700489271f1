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
 * Rows move as block copies. The column pass is a row-major gather, dst[r][c] = src[r − v[c]][c], in strips of columns,
 * 32 rows at a time where they read alike; a full render also applies the second row pass while it stores, so the
 * frame takes one copy and one gather.
 */
export class Renderer<T extends PixelData> {
  readonly width: number;
  readonly height: number;
  private readonly a: T;
  /** The second own plane, made on the first render that needs it (renderInto never does). */
  private bPlane: T | null = null;
  private readonly type: Ctor<T>;
  /** The gathers from plane a into plane b, one row and GROUP rows at a time: this renderer's own compiled copies (see ownGather). */
  private ownGather: Gathers | null | undefined = undefined;
  /** Per column c: its shift t reduced into [−H, H] (wrap: the remainder of v[c] by H; clip: clamped). */
  private readonly colShift: Int32Array;
  /** Per column c: c − t·W; adding r·W gives the index of the source pixel that row r of column c takes. */
  private readonly colOff: Int32Array;
  private readonly stripWidth: number;
  /** A group of rows: where its columns are cut, and each row's destination offset in the current cut. */
  private readonly cuts = new Int32Array(3 * GROUP + 2);
  private readonly rowDst = new Int32Array(GROUP);
  private readonly rowSrc = new Int32Array(GROUP);
  /** Per row of a group whose strip crosses an edge: where its columns start reading inside, and past it (see piece). */
  private readonly rowIn = new Int32Array(GROUP);
  private readonly rowOut = new Int32Array(GROUP);

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
   * Column pass, dst[r][c] = src[r − v[c]][c] with the edge rule, as a row-major gather in strips of columns, GROUP rows
   * at a time where they read alike (group), else row by row (piece). With `h` it also does the second row pass while
   * storing: row r of the result is written shifted by h[r] (spec §5 step 4).
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
    const { one: run, rows } = own && this.ownGather ? this.ownGather : gatherFor(src, dst, colOff);
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
      // Falling strips go from the bottom row up: measured on a 4K RGBA frame against the same strips top down, a sixth
      // less time from −40° to −50° and at 135° (the angles where the top-down walk was slowest), within a few percent
      // elsewhere.
      if (strip.order < 0) {
        for (let r = H; r > 0;) {
          if (r - GROUP >= 0 && this.group(dst, run, rows, strip, h, r - GROUP, (r - GROUP) * W, c0, c1, clip)) {
            r -= GROUP;
            continue;
          }
          r--;
          this.row(src, dst, run, strip, h, r, r * W, c0, c1, clip);
        }
      } else {
        for (let r = 0; r < H;) {
          if (r + GROUP <= H && this.group(dst, run, rows, strip, h, r, r * W, c0, c1, clip)) {
            r += GROUP;
            continue;
          }
          this.row(src, dst, run, strip, h, r, r * W, c0, c1, clip);
          r++;
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

  /** Row r (at offset o) of a strip, columns c0 … c1−1, with the second row pass's shift of that row when `h` is given. */
  private row(
    src: T,
    dst: T,
    run: Gather,
    strip: Strip,
    h: ArrayLike<number> | undefined,
    r: number,
    o: number,
    c0: number,
    c1: number,
    clip: boolean,
  ): void {
    if (h === undefined) {
      this.piece(src, dst, run, strip, r, o, c0, c1, clip);
      return;
    }
    const W = this.width;
    const s = h[r];
    if (clip) {
      // Columns that the second row pass moves off the canvas are dropped; the uncovered part is filled by gather.
      if (s >= W || s <= -W) return;
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

  /**
   * Rows r … r+GROUP−1, columns c0 … c1−1 of a strip, all rows of a column at once. Each row's columns are cut where
   * its reads cross an edge (as in piece: wrap reads a row H away, clip stores 0) and, with the second row pass (`h`),
   * where its store wraps round (wrap) or leaves the canvas (clip); a cut where every row reads and stores goes all rows
   * at once, others row by row. False, having done nothing, for a strip whose shifts go both ways across an edge, or a
   * clip strip wholly off the canvas for these rows (piece fills those).
   */
  private group(
    dst: T,
    run: Gather,
    rows: GatherRows,
    strip: Strip,
    h: ArrayLike<number> | undefined,
    r: number,
    o: number,
    c0: number,
    c1: number,
    clip: boolean,
  ): boolean {
    const W = this.width;
    const H = this.height;
    const N = W * H;
    const { tMin, tMax, order } = strip;
    const last = r + GROUP - 1;
    // Uniform: every row reads all its columns inside (0) or, in wrap, all across the same edge (±N).
    let uniform: number | null = null;
    if (r - tMax >= 0 && last - tMin < H) uniform = 0;
    else if (last - tMin < 0 || r - tMax >= H) {
      if (clip) return false;
      uniform = last - tMin < 0 ? N : -N;
    } else if (order === 0) return false;
    const { cuts, rowDst, rowSrc, rowIn, rowOut } = this;
    const rising = order > 0;
    let n = 0;
    cuts[n++] = c0;
    for (let i = 0; i < GROUP; i++) {
      const s = h === undefined ? 0 : h[r + i];
      if (clip) {
        if (s >= W || s <= -W) return false;
        if (s < 0 && -s > c0 && -s < c1) cuts[n++] = -s;
        if (s > 0 && W - s > c0 && W - s < c1) cuts[n++] = W - s;
      } else {
        const split = W - mod(s, W);
        if (split > c0 && split < c1) cuts[n++] = split;
      }
      if (uniform === null) {
        // As in piece: rising shifts read q ≥ H, then inside, then q < 0 along the row; falling ones the reverse.
        const q = r + i;
        const b1 = firstPast(this.colShift, c0, c1, rising ? q - H : q, rising);
        const b2 = firstPast(this.colShift, b1, c1, rising ? q : q - H, rising);
        rowIn[i] = b1;
        rowOut[i] = b2;
        if (b1 > c0 && b1 < c1) cuts[n++] = b1;
        if (b2 > c0 && b2 < c1) cuts[n++] = b2;
      }
    }
    cuts[n++] = c1;
    sortShort(cuts, n);
    const before = rising ? -N : N;
    for (let k = 0; k + 1 < n; k++) {
      const a = cuts[k];
      const b = cuts[k + 1];
      if (a >= b) continue;
      // Each row's source and destination offsets in this cut (a destination from −W up: the cut's columns are added
      // to it), or DROPPED where the row stores nothing of the cut.
      let all = true;
      for (let i = 0, ro = o; i < GROUP; i++, ro += W) {
        const s = h === undefined ? 0 : h[r + i];
        let d: number;
        if (clip) d = (s < 0 ? a >= -s : b <= W - s) ? ro + s : DROPPED;
        else {
          const m = mod(s, W);
          d = a < W - m ? ro + m : ro + m - W;
        }
        const across = uniform ?? (a < rowIn[i] ? before : a < rowOut[i] ? 0 : -before);
        if (clip && across !== 0) {
          if (d !== DROPPED) dst.fill(0, d + a, d + b);
          d = DROPPED;
        }
        rowDst[i] = d;
        rowSrc[i] = ro + across;
        if (d === DROPPED) all = false;
      }
      if (all) rows(rowSrc, rowDst, a, b);
      else for (let i = 0; i < GROUP; i++) if (rowDst[i] !== DROPPED) run(rowSrc[i], rowDst[i], a, b);
    }
    return true;
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

/** GROUP rows i at once: dst[d[i] + c] = src[s[i] + colOff[c]] for c in [a, b), each column's offset read once. */
type GatherRows = (s: Int32Array, d: Int32Array, a: number, b: number) => void;

/** The column pass's two loops over one pair of planes. */
interface Gathers {
  readonly one: Gather;
  readonly rows: GatherRows;
}

/**
 * Rows the column pass takes at once (Renderer.group). Measured on a 4K RGBA frame at 34 angles from −89° to 179.5°,
 * interleaved in one process with the three-copy floor (7.0 ms in that run): row by row, as before, a render took 2.0
 * to 5.7 times the floor, and which angles were slow looked arbitrary (how the rows a gather reads fall in the caches
 * and address-translation buffers); 32 rows at a time took 1.7 to 2.3 times it. Each column's offset is read once for
 * all the rows, and a steep strip reads a few pages per column instead of a new page per pixel. Four rows at a time
 * still varied from 1.4 to 3.1; 8, 16 and 24 rows lay between; 64 rows were slower again at small angles.
 */
const GROUP = 32;

/** Renderer.group's mark for a row that a cut stores nothing of: below any real offset, which is at least −W. */
const DROPPED = -0x80000000;

/** GATHER_SOURCE's lines for GROUP rows: each row's destination offset and first source pixel, read once per call. */
function rowsHead(): string {
  return Array.from({ length: GROUP }, (_, i) => `const d${i} = d[${i}];\n  const b${i} = s[${i}];`).join("\n  ");
}

/** GATHER_SOURCE's stores of one column for GROUP rows. */
function rowsStep(): string {
  return Array.from({ length: GROUP }, (_, i) => `dst[d${i} + c] = src[b${i} + j];`).join("\n    ");
}

/**
 * The two loops as source text, one for every element type, with the planes, the offsets and the width W as the
 * enclosing function's parameters. One row: unrolled by 8. GROUP rows: a column at a time, its offset read once for
 * all of them.
 */
const GATHER_SOURCE = `const one = (base, d, a, b) => {
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
const rows = (s, d, a, b) => {
  ${rowsHead()}
  for (let c = a; c < b; c++) {
    const j = colOff[c];
    ${rowsStep()}
  }
};
return { one, rows };`;

type GathersFactory = (src: PixelData, dst: PixelData, colOff: Int32Array) => Gathers;

/** How many factories have been compiled: each one's source is made unique with it (see compileGathers). */
let compiled = 0;

/**
 * Compiles GATHER_SOURCE into a factory of its own, or null where source cannot be compiled at run time (see
 * ownGather). The source names the factory's number, so V8's cache of compiled source never hands one factory's code
 * and type feedback to another.
 */
function compileGathers(): GathersFactory | null {
  try {
    return new Function("src", "dst", "colOff", `// gathers ${++compiled}\n${GATHER_SOURCE}`) as GathersFactory;
  } catch {
    return null;
  }
}

/**
 * The loops over two planes of the caller's: GATHER_SOURCE compiled once per element type, on the first column pass
 * that needs it (a page that loads the core but never renders must not try: its content security policy would report
 * the attempt), so that each type's closures only ever see one kind of typed array and their loops stay monomorphic
 * however many renderers (of whatever kinds) the process has. They are made anew for every column pass, so their speed
 * never depends on V8 specialising a single closure to its arrays (the renderer before issue 10 did that: its first
 * renderer ran up to 1.8 times faster than a second one). Where source cannot be compiled, the loops below, shared by
 * all kinds.
 */
const sharedFactories = new Map<string, GathersFactory | null>();

function gatherFor<T extends PixelData>(src: T, dst: T, colOff: Int32Array): Gathers {
  const kind = dst instanceof Uint32Array ? "u32" : dst instanceof Uint8Array ? "u8" : "any";
  let factory = sharedFactories.get(kind);
  if (factory === undefined) sharedFactories.set(kind, (factory = compileGathers()));
  return factory ? factory(src, dst, colOff) : writtenGathers(src, dst, colOff);
}

/**
 * The loops for where nothing can be compiled at run time (a worker or page whose content security policy forbids it),
 * for every element type. GROUP rows go four at a time: without compiled-in locals for all of them, a loop over the
 * rows for every column measured about three times as slow.
 */
function writtenGathers(src: PixelData, dst: PixelData, colOff: Int32Array): Gathers {
  return {
    one: (base, d, a, b) => {
      let c = a;
      for (; c + 3 < b; c += 4) {
        const p = d + c;
        dst[p] = src[base + colOff[c]];
        dst[p + 1] = src[base + colOff[c + 1]];
        dst[p + 2] = src[base + colOff[c + 2]];
        dst[p + 3] = src[base + colOff[c + 3]];
      }
      for (; c < b; c++) dst[d + c] = src[base + colOff[c]];
    },
    rows: (s, d, a, b) => {
      for (let i = 0; i < GROUP; i += 4) {
        const s0 = s[i];
        const s1 = s[i + 1];
        const s2 = s[i + 2];
        const s3 = s[i + 3];
        const d0 = d[i];
        const d1 = d[i + 1];
        const d2 = d[i + 2];
        const d3 = d[i + 3];
        for (let c = a; c < b; c++) {
          const j = colOff[c];
          dst[d0 + c] = src[s0 + j];
          dst[d1 + c] = src[s1 + j];
          dst[d2 + c] = src[s2 + j];
          dst[d3 + c] = src[s3 + j];
        }
      }
    },
  };
}

/**
 * The loops over a renderer's own two planes, compiled from source for that renderer alone: functions of its own,
 * whose only closure holds that renderer's planes, so V8 compiles them in as constants (no reloads or range checks of
 * the arrays in the loop). The renderer before issue 10 had this for its first renderer only (one function shared by
 * all, specialised while a process had one renderer: a second made both up to 1.8 times slower); here every renderer
 * has its own, and a second renderer changes nothing of the first's. Where source cannot be compiled at run time (a
 * page whose content security policy forbids it), null: the renderer uses the loops above.
 */
function ownGather<T extends PixelData>(src: T, dst: T, colOff: Int32Array): Gathers | null {
  const factory = compileGathers();
  return factory ? factory(src, dst, colOff) : null;
}

/** Sorts the first n entries of a short list in place (insertion sort: a group's cuts are a few dozen at most). */
function sortShort(list: Int32Array, n: number): void {
  for (let i = 1; i < n; i++) {
    const x = list[i];
    let j = i - 1;
    for (; j >= 0 && list[j] > x; j--) list[j + 1] = list[j];
    list[j + 1] = x;
  }
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
