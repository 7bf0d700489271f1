/**
 * A second, deliberately plain reading of the core contract (docs/shear-core.md), written from the spec's words and not
 * from src: BigInt arithmetic for shifts, one pixel at a time for the passes. Tests compare the core with it.
 */
import type { Rounding } from "../../src/index.ts";

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
