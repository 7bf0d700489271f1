/** Where an attached sprite sits in the effect's canvas. Shared by the bench, its worker and the server. */

/** The sprite's top-left pixel in the canvas: the stored x and y, or centred (rounded down) on an axis left empty. */
export function spritePlacement(
  canvas: { width: number; height: number },
  sprite: { width: number; height: number },
  x: number | null,
  y: number | null,
): { x: number; y: number } {
  return {
    x: x ?? Math.floor((canvas.width - sprite.width) / 2),
    y: y ?? Math.floor((canvas.height - sprite.height) / 2),
  };
}

/** Key pixels in canvas pixels: sprite pixels moved by the placement (canvas pixels already without a sprite). */
export function keyPixelsOnCanvas(keyPixels: readonly (readonly [number, number])[], placement: { x: number; y: number } | null) {
  return keyPixels.map(([x, y]) => (placement ? [x + placement.x, y + placement.y] : [x, y]) as [number, number]);
}
