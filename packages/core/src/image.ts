/** An RGBA colour, each channel 0–255. */
export type Rgba = readonly [number, number, number, number];

/** A paletted picture: one palette index per pixel, row-major; index 0 is the background. */
export interface IndexedImage {
  readonly kind: "indexed";
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
  readonly palette: readonly Rgba[];
}

/** A true-colour picture: four bytes (R, G, B, A) per pixel, row-major; transparent black is the background. */
export interface RgbaImage {
  readonly kind: "rgba";
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
}

/** A picture the core can place, turn and save. */
export type Image = IndexedImage | RgbaImage;

/** The image's pixels as a plane of one element per pixel: indices as bytes, RGBA as 32-bit words (shares memory when aligned). */
export function imagePlane(image: Image): Uint8Array | Uint32Array {
  if (image.kind === "indexed") return image.data;
  const { data } = image;
  if (data.byteOffset % 4 === 0) return new Uint32Array(data.buffer, data.byteOffset, data.length / 4);
  return new Uint32Array(data.slice().buffer);
}

/** An image of the same kind (and palette) as `like`, holding the pixels of `plane`. */
export function imageFromPlane(like: Image, plane: Uint8Array | Uint32Array): Image {
  if (like.kind === "indexed") return { ...like, data: Uint8Array.from(plane as Uint8Array) };
  const data = new Uint8Array(plane.length * 4);
  new Uint32Array(data.buffer).set(plane as Uint32Array);
  return { kind: "rgba", width: like.width, height: like.height, data };
}

/** Which pixels are not background: 1 for opaque pixels of an RGBA image (alpha > 0) or non-zero indices, else 0. */
export function opaqueMask(image: Image): Uint8Array {
  const n = image.width * image.height;
  const mask = new Uint8Array(n);
  if (image.kind === "indexed") {
    for (let i = 0; i < n; i++) mask[i] = image.data[i] === 0 ? 0 : 1;
  } else {
    for (let i = 0; i < n; i++) mask[i] = image.data[i * 4 + 3] === 0 ? 0 : 1;
  }
  return mask;
}

/** Places `sprite` into a new `width` × `height` canvas of the same kind with its top-left corner at (x, y) pixels; parts outside are cut. */
export function placeImage(sprite: Image, width: number, height: number, x: number, y: number): Image {
  const bpp = sprite.kind === "indexed" ? 1 : 4;
  const data = new Uint8Array(width * height * bpp);
  for (let r = 0; r < sprite.height; r++) {
    const ty = y + r;
    if (ty < 0 || ty >= height) continue;
    const c0 = Math.max(0, -x);
    const c1 = Math.min(sprite.width, width - x);
    if (c1 <= c0) continue;
    data.set(sprite.data.subarray((r * sprite.width + c0) * bpp, (r * sprite.width + c1) * bpp), (ty * width + x + c0) * bpp);
  }
  return sprite.kind === "indexed" ? { ...sprite, width, height, data } : { kind: "rgba", width, height, data };
}
