/** Key pixels on the canvas; where the sprite sits is app/effects/placement.ts (shared with the frame downloads). */
export { spritePlacement } from "../effects/placement.ts";

/** Key pixels in canvas pixels: sprite pixels moved by the placement (canvas pixels already without a sprite). */
export function keyPixelsOnCanvas(keyPixels: readonly (readonly [number, number])[], placement: { x: number; y: number } | null) {
  return keyPixels.map(([x, y]) => (placement ? [x + placement.x, y + placement.y] : [x, y]) as [number, number]);
}
