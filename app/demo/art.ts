/**
 * The demo's pictures, drawn by code at seed time: a compass-rose emblem for the title screen and a
 * stormy harbour background. Both are indexed pictures, as the targets store them.
 */
import type { IndexedImage, Rgba } from "@skewsmith/core";

type Point = readonly [number, number];

function insidePolygon(x: number, y: number, polygon: readonly Point[]): boolean {
  let inside = false;
  for (let i = 0, j = polygon.length - 1; i < polygon.length; j = i++) {
    const [xi, yi] = polygon[i];
    const [xj, yj] = polygon[j];
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/** Palette of the compass rose; index 0 is the transparent colour (first, as most targets expect). */
export const COMPASS_PALETTE: readonly Rgba[] = [
  [0, 0, 0, 0], // 0 transparent
  [20, 28, 44, 255], // 1 ink outline
  [226, 214, 178, 255], // 2 parchment (lit half of a point)
  [160, 124, 62, 255], // 3 brass (shaded half of a point)
  [58, 122, 134, 255], // 4 sea-green ring
  [196, 72, 52, 255], // 5 north marker
];

/** A compass rose, `size` pixels square (32 for the demo), centred on the canvas. */
export function compassRose(size = 32): IndexedImage {
  const c = size / 2;
  const r = size / 2 - 1.5;
  const indices = new Uint8Array(size * size);
  // Eight points: long ones to N, E, S, W and short ones on the diagonals, each split into a lit and a shaded half.
  const points: { tip: Point; left: Point; right: Point; north: boolean }[] = [];
  for (let k = 0; k < 8; k++) {
    const angle = (k * Math.PI) / 4 - Math.PI / 2;
    const long = k % 2 === 0;
    const reach = long ? r : r * 0.62;
    const waist = long ? size * 0.11 : size * 0.08;
    const tip: Point = [c + Math.cos(angle) * reach, c + Math.sin(angle) * reach];
    const left: Point = [c + Math.cos(angle - Math.PI / 2) * waist, c + Math.sin(angle - Math.PI / 2) * waist];
    const right: Point = [c + Math.cos(angle + Math.PI / 2) * waist, c + Math.sin(angle + Math.PI / 2) * waist];
    points.push({ tip, left, right, north: k === 0 });
  }
  // Short points first so the long ones draw over them.
  const order = [1, 3, 5, 7, 0, 2, 4, 6].map((k) => points[k]);
  for (let y = 0; y < size; y++)
    for (let x = 0; x < size; x++) {
      const px = x + 0.5;
      const py = y + 0.5;
      const d = Math.hypot(px - c, py - c);
      let index = 0;
      if (d <= r && d >= r - 1.6) index = 4;
      for (const p of order) {
        if (insidePolygon(px, py, [p.tip, p.left, [c, c]])) index = p.north ? 5 : 2;
        else if (insidePolygon(px, py, [p.tip, [c, c], p.right])) index = p.north ? 5 : 3;
      }
      if (d <= size * 0.06) index = 1;
      indices[y * size + x] = index;
    }
  // Outline: transparent pixels that touch a drawn pixel, inside the ring.
  const drawn = indices.slice();
  for (let y = 0; y < size; y++)
    for (let x = 0; x < size; x++) {
      if (drawn[y * size + x] !== 0) continue;
      if (Math.hypot(x + 0.5 - c, y + 0.5 - c) > r) continue;
      const touches = [
        [1, 0],
        [-1, 0],
        [0, 1],
        [0, -1],
      ].some(([dx, dy]) => {
        const nx = x + dx;
        const ny = y + dy;
        const v = nx >= 0 && ny >= 0 && nx < size && ny < size ? drawn[ny * size + nx] : 0;
        return v === 2 || v === 3 || v === 5;
      });
      if (touches) indices[y * size + x] = 1;
    }
  return { kind: "indexed", width: size, height: size, data: indices, palette: COMPASS_PALETTE };
}

/**
 * Palette of the storm background. Index 0 is the transparent background, as for the rose: the picture itself uses
 * only the opaque colours 1 to 13, so a frame on a canvas grown past the screen shows the turned picture over nothing
 * rather than over a band of night sky (placing a picture in a larger canvas fills the rest with index 0).
 */
export const STORM_PALETTE: readonly Rgba[] = [
  [0, 0, 0, 0], // 0 transparent background
  [12, 16, 28, 255], // 1 night sky
  [24, 32, 52, 255], // 2 sky band
  [38, 48, 72, 255], // 3 sky band
  [58, 68, 94, 255], // 4 cloud shadow
  [88, 98, 124, 255], // 5 cloud
  [132, 142, 164, 255], // 6 cloud light
  [18, 40, 54, 255], // 7 deep sea
  [28, 62, 78, 255], // 8 sea
  [52, 98, 112, 255], // 9 wave
  [170, 204, 210, 255], // 10 foam
  [10, 12, 18, 255], // 11 harbour wall
  [230, 196, 110, 255], // 12 lamp
  [96, 120, 150, 255], // 13 rain
];

/** A deterministic pseudo-random number in [0, 1) for integer coordinates (no state, same picture every run). */
function hash(x: number, y: number, seed: number): number {
  let h = (x * 374761393 + y * 668265263 + seed * 2147483647) | 0;
  h = Math.imul(h ^ (h >>> 13), 1274126177);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

function smoothNoise(x: number, y: number, scale: number, seed: number): number {
  const gx = x / scale;
  const gy = y / scale;
  const x0 = Math.floor(gx);
  const y0 = Math.floor(gy);
  const tx = gx - x0;
  const ty = gy - y0;
  const sx = tx * tx * (3 - 2 * tx);
  const sy = ty * ty * (3 - 2 * ty);
  const a = hash(x0, y0, seed);
  const b = hash(x0 + 1, y0, seed);
  const c = hash(x0, y0 + 1, seed);
  const d = hash(x0 + 1, y0 + 1, seed);
  return a + (b - a) * sx + (c - a) * sy + (a - b - c + d) * sx * sy;
}

/** A stormy harbour at night, 256 × 224 by default: banded sky, clouds, rain, a sea of waves and a lamp on the mole. */
export function stormBackground(width = 256, height = 224): IndexedImage {
  const indices = new Uint8Array(width * height);
  const horizon = Math.round(height * 0.62);
  const bayer = [
    [0, 8, 2, 10],
    [12, 4, 14, 6],
    [3, 11, 1, 9],
    [15, 7, 13, 5],
  ];
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const threshold = (bayer[y & 3][x & 3] + 0.5) / 16;
      let index: number;
      if (y < horizon) {
        const t = y / horizon;
        const band = t * 2.2 + threshold * 0.9;
        index = band < 1 ? 1 : band < 2 ? 2 : 3;
        const cloud = smoothNoise(x, y * 1.8, 36, 7) * 0.65 + smoothNoise(x, y * 1.8, 14, 11) * 0.35;
        const c = cloud - 0.42 + t * 0.08;
        if (c > 0.22 + threshold * 0.08) index = 6;
        else if (c > 0.12 + threshold * 0.06) index = 5;
        else if (c > 0.03 + threshold * 0.05) index = 4;
        // Slanted rain streaks.
        if ((x + Math.floor(y / 2)) % 23 === 0 && hash(x, Math.floor(y / 6), 3) > 0.45) index = 13;
      } else {
        const depth = (y - horizon) / (height - horizon);
        index = depth + threshold * 0.35 < 0.45 ? 7 : 8;
        const wave = Math.sin(x / (9 + depth * 10) + y * 0.9 + smoothNoise(x, y, 20, 5) * 5);
        if (wave > 0.86) index = 9;
        if (wave > 0.97 && hash(x, y, 9) > 0.5) index = 10;
      }
      indices[y * width + x] = index;
    }
  // The harbour mole on the right, with a lamp post.
  const moleTop = horizon - Math.round(height * 0.05);
  for (let y = moleTop; y < horizon + 6; y++) for (let x = Math.round(width * 0.68); x < width; x++) indices[y * width + x] = 11;
  const postX = Math.round(width * 0.86);
  for (let y = moleTop - 30; y < moleTop; y++) {
    indices[y * width + postX] = 11;
    indices[y * width + postX + 1] = 11;
  }
  for (let y = moleTop - 34; y < moleTop - 30; y++) for (let x = postX - 1; x < postX + 3; x++) indices[y * width + x] = 12;
  return { kind: "indexed", width, height, data: indices, palette: STORM_PALETTE };
}
