/**
 * A second, deliberately plain reading of the core contract (docs/shear-core.md), written from the spec's words and not
 * from src: BigInt arithmetic for shifts, one pixel at a time for the passes. Tests compare the core with it.
 */
import { all, create, type BigNumber } from "mathjs";
import type { Rounding, Sweep } from "../../src/index.ts";

/** s(k, t) = R(k·t / 2^(F+1)) in exact integers (spec §4), via BigInt quotient and remainder. */
export function refShift(k: number, t: number, fraction: number, rounding: Rounding): number {
  const n = BigInt(k) * BigInt(t);
  const d = 1n << BigInt(fraction + 1);
  const q = n / d; // BigInt division truncates toward zero
  const rem = n % d; // has the sign of n
  let s: bigint;
  switch (rounding) {
    case "trunc":
      s = q;
      break;
    case "floor":
      s = rem < 0n ? q - 1n : q;
      break;
    case "nearest-away": {
      const twiceRem = rem < 0n ? -2n * rem : 2n * rem;
      s = twiceRem >= d ? q + (n < 0n ? -1n : 1n) : q;
      break;
    }
    case "nearest-up": {
      // floor(x + 1/2) = floor((2n + d) / 2d)
      const num = 2n * n + d;
      const den = 2n * d;
      const q2 = num / den;
      s = num % den < 0n ? q2 - 1n : q2;
      break;
    }
  }
  return Number(s);
}

/** The shift tables of spec §4, one entry at a time. */
export function refTables(
  alpha: number,
  beta: number,
  width: number,
  height: number,
  pivot: { x: number; y: number },
  fraction: number,
  rounding: Rounding,
  group = 1,
): { h: number[]; v: number[] } {
  const p2x = 2 * pivot.x;
  const p2y = 2 * pivot.y;
  const h = Array.from({ length: height }, (_, r) => refShift(alpha, 2 * r + 1 - p2y, fraction, rounding));
  const v = Array.from({ length: width }, (_, c) => refShift(beta, 2 * Math.floor(c / group) * group + group - p2x, fraction, rounding));
  return { h, v };
}

export interface RefFrame {
  readonly flip: boolean;
  readonly h: ArrayLike<number>;
  readonly v: ArrayLike<number>;
}

export interface RefGeometry {
  readonly canvas: { readonly width: number; readonly height: number };
  readonly pivot: { readonly x: number; readonly y: number };
  readonly edges: "wrap" | "clip";
}

/** Where one source pixel goes after each step of spec §5: `positions[k]` after step k+1, null once clipped; `crossed` if any step left the canvas. */
export function refPath(
  c: number,
  r: number,
  frame: RefFrame,
  geometry: RefGeometry,
): { positions: ({ c: number; r: number } | null)[]; crossed: boolean } {
  const W = geometry.canvas.width;
  const H = geometry.canvas.height;
  const P2x = 2 * geometry.pivot.x;
  const P2y = 2 * geometry.pivot.y;
  let crossed = false;
  let clipped = false;
  const edge = (x: number, n: number) => {
    if (x >= 0 && x < n) return x;
    crossed = true;
    if (geometry.edges === "clip") clipped = true;
    return ((x % n) + n) % n;
  };
  const positions: ({ c: number; r: number } | null)[] = [];
  const record = (pc: number, pr: number) => positions.push(clipped ? null : { c: pc, r: pr });
  // 1. optional half-turn flip
  if (frame.flip) {
    c = edge(P2x - 1 - c, W);
    r = edge(P2y - 1 - r, H);
  }
  record(c, r);
  // 2. horizontal pass
  const c1 = edge(c + frame.h[r], W);
  record(c1, r);
  // 3. vertical pass
  const r2 = edge(r + frame.v[c1], H);
  record(c1, r2);
  // 4. horizontal pass, indexed by the row reached
  const c3 = edge(c1 + frame.h[r2], W);
  record(c3, r2);
  return { positions, crossed };
}

/** Renders `src` (one value per pixel, 0 = background) by moving every pixel along its reference path; `pass` 1–3 stops after steps 2–4. */
export function refRender(src: ArrayLike<number>, frame: RefFrame, geometry: RefGeometry, pass: 1 | 2 | 3 = 3): number[] {
  const W = geometry.canvas.width;
  const H = geometry.canvas.height;
  const out = new Array<number>(W * H).fill(0);
  const written = new Uint8Array(W * H);
  for (let r = 0; r < H; r++)
    for (let c = 0; c < W; c++) {
      const to = refPath(c, r, frame, geometry).positions[pass];
      if (!to) continue;
      const i = to.r * W + to.c;
      if (written[i]) throw new Error(`reference: two pixels landed on (${to.c}, ${to.r})`);
      written[i] = 1;
      out[i] = src[r * W + c];
    }
  return out;
}

/** The ideal position of pixel (c, r)'s centre, in pixel-edge coordinates, after a turn by `degrees` about the pivot (spec §1). */
export function idealCentre(c: number, r: number, degrees: number, pivot: { x: number; y: number }): { x: number; y: number } {
  const t = (degrees * Math.PI) / 180;
  const x = c + 0.5 - pivot.x;
  const y = r + 0.5 - pivot.y;
  return { x: pivot.x + x * Math.cos(t) - y * Math.sin(t), y: pivot.y + x * Math.sin(t) + y * Math.cos(t) };
}

/** Values 1 … W·H, every pixel distinct, so each source pixel can be found again in a rendered plane. */
export function distinctPlane(width: number, height: number): Uint32Array<ArrayBuffer> {
  return Uint32Array.from({ length: width * height }, (_, i) => i + 1);
}

/** One frame as spec §2–§4 define it, computed by `refFrames`: angles in degrees, coefficients, whole tables. */
export interface RefFrameTables {
  readonly index: number;
  readonly degrees: number;
  readonly residualDegrees: number;
  readonly flip: boolean;
  readonly alpha: number;
  readonly beta: number;
  readonly saturated: boolean;
  readonly h: number[];
  readonly v: number[];
}

/** mathjs with 60-digit decimals: tan and sin of the residual angle, evaluated outside the core's floating point. */
const big = create(all, { number: "BigNumber", precision: 60 });

/** nearest(x·2^F) for x given as a BigNumber, half away from zero (spec §3). */
function nearestScaled(x: BigNumber, fraction: number): number {
  const scaled = big.multiply(x, big.pow(big.bignumber(2), big.bignumber(fraction))) as BigNumber;
  // Decimal's own floor, not mathjs's: that one treats a value within its relative tolerance (1e-12) of an integer as
  // that integer, which turned 859844870.49969… + 1/2 into 859844871 (test/coefficients.test.ts has that case).
  const r = (big.add(big.abs(scaled), big.bignumber(0.5)) as BigNumber).floor();
  const n = Number((scaled.isNegative() ? big.unaryMinus(r) : r).toString());
  return n === 0 ? 0 : n;
}

/**
 * Every frame of a (validated, defaults filled in) effect as the spec's words define it: the angle track (§2), θ reduced
 * into (−180°, 180°], the half-turn rule, kα = sat(nearest(−tan(θr/2)·2^F)) and kβ = sat(nearest(sin θr·2^F)) with tan and
 * sin from mathjs BigNumber (sin exact at multiples of 30°, where it is rational: 0, ±1/2, ±1), then the tables of §4 from
 * refShift. Slow and plain on purpose: the export tests take their expected bytes from here, not from the core.
 */
export function refFrames(effect: {
  readonly canvas: { readonly width: number; readonly height: number };
  readonly pivot: { readonly x: number; readonly y: number };
  readonly angles: { readonly list: readonly number[] } | { readonly sweep: Sweep };
  readonly fixedPoint: { readonly bits: number; readonly fraction: number };
  readonly rounding: Rounding;
  readonly halfTurn: "flip" | "shear";
  readonly columnGroup: number;
}): RefFrameTables[] {
  const { bits, fraction } = effect.fixedPoint;
  const min = -(2 ** (bits - 1));
  const max = 2 ** (bits - 1) - 1;
  let angles: number[];
  if ("list" in effect.angles) angles = [...effect.angles.list];
  else {
    const { from, to, frames, easing, includeEnd } = effect.angles.sweep;
    angles = Array.from({ length: frames }, (_, i) => {
      const t = includeEnd ? (frames === 1 ? 0 : i / (frames - 1)) : i / frames;
      return from + (to - from) * (easing === "linear" ? t : (1 - Math.cos(Math.PI * t)) / 2);
    });
  }
  return angles.map((a, index) => {
    let degrees = a % 360;
    if (degrees > 180) degrees -= 360;
    if (degrees <= -180) degrees += 360;
    if (degrees === 0) degrees = 0;
    const flip = effect.halfTurn === "flip" && Math.abs(degrees) > 90;
    const residualDegrees = flip ? (degrees > 0 ? degrees - 180 : degrees + 180) : degrees;
    // The double's exact decimal digits, so the 60-digit evaluation starts from the very angle the track holds.
    const radians = big.divide(big.multiply(big.bignumber(residualDegrees.toPrecision(60)), big.pi), big.bignumber(180)) as BigNumber;
    const rational = [0, 0.5, undefined, 1, undefined, 0.5, 0, -0.5, undefined, -1, undefined, -0.5];
    const sinExact = residualDegrees % 30 === 0 ? rational[(((residualDegrees % 360) + 360) % 360) / 30] : undefined;
    const sin = sinExact !== undefined ? big.bignumber(sinExact) : (big.sin(radians) as BigNumber);
    let saturated = false;
    const sat = (k: number) => {
      if (k >= min && k <= max) return k;
      saturated = true;
      return k < 0 ? min : max;
    };
    const alpha = sat(nearestScaled(big.unaryMinus(big.tan(big.divide(radians, 2) as BigNumber)) as BigNumber, fraction));
    const beta = sat(nearestScaled(sin, fraction));
    const { h, v } = refTables(
      alpha,
      beta,
      effect.canvas.width,
      effect.canvas.height,
      effect.pivot,
      fraction,
      effect.rounding,
      effect.columnGroup,
    );
    return { index, degrees, residualDegrees, flip, alpha, beta, saturated, h, v };
  });
}
