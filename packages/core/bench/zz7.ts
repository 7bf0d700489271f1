import { decode } from "fast-png";
import sharp from "sharp";
import { decodePng } from "../src/png.ts";
const W = 1920,
  H = 1080;
const rgba = new Uint8Array(W * H * 4);
let seed = 12345;
for (let i = 0; i < W * H; i++) {
  seed = (seed * 1103515245 + 12345) >>> 0;
  const x = i % W;
  const y = (i / W) | 0;
  const noise = (seed >>> 24) & 15;
  rgba.set([(x >> 3) ^ noise, (y >> 2) + noise, ((x * y) >> 10) & 255, (x + y) % 97 < 3 ? 0 : 255], 4 * i);
}
const sh = new Uint8Array(
  await sharp(rgba, { raw: { width: W, height: H, channels: 4 } })
    .png({ adaptiveFiltering: true })
    .toBuffer(),
);
const a: number[] = [],
  b: number[] = [];
for (let k = 0; k < 16; k++) {
  let t = performance.now();
  decodePng(sh);
  a.push(performance.now() - t);
  t = performance.now();
  decode(sh);
  b.push(performance.now() - t);
}
const med = (x: number[]) => x.sort((p, q) => p - q)[x.length >> 1];
console.log("core", med(a).toFixed(1), "fast-png", med(b).toFixed(1));
