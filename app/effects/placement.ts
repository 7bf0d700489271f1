/** Where a sprite sits in an effect's canvas. Shared by the frame downloads, the sprite library and the bench, so all agree. */

/** A rectangle in canvas pixels: top-left corner and size. */
export interface PlacedRect {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
}

/**
 * The sprite's top-left pixel in the canvas: the effect's own (spriteX, spriteY) when set, else centred, the odd
 * pixel of a difference going to the right and bottom (floor of half the difference, common practice).
 */
export function spritePlacement(
  canvas: { readonly width: number; readonly height: number },
  sprite: { readonly width: number; readonly height: number },
  spriteX: number | null,
  spriteY: number | null,
): PlacedRect {
  return {
    x: spriteX ?? Math.floor((canvas.width - sprite.width) / 2),
    y: spriteY ?? Math.floor((canvas.height - sprite.height) / 2),
    width: sprite.width,
    height: sprite.height,
  };
}

/** True when the whole rectangle lies inside the canvas (no pixel of the sprite is cut off). */
export function insideCanvas(rect: PlacedRect, canvas: { readonly width: number; readonly height: number }): boolean {
  return rect.x >= 0 && rect.y >= 0 && rect.x + rect.width <= canvas.width && rect.y + rect.height <= canvas.height;
}
