/**
 * Sprites are indexed (palette) PNG files: retro targets keep palette indices as they are, so a sprite is read
 * with core's PNG reader and refused when it is not indexed. Writing goes through core's encodePng.
 */
import { decodePng, type IndexedImage } from "@skewsmith/core";

/** Decodes a palette PNG into indices and an RGBA palette; refuses other colour types with a clear message. */
export function decodeIndexedPng(bytes: Uint8Array): IndexedImage {
  const image = decodePng(bytes);
  if (image.kind !== "indexed")
    throw new RangeError("the PNG is not indexed (it has no palette); save it as an indexed-colour (palette) PNG");
  return image;
}
