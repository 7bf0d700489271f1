/** The integer element types a table can be stored as (spec §4). */
export const ELEMENT_TYPES = ["int8", "int16", "int32"] as const;
export type ElementType = (typeof ELEMENT_TYPES)[number];

/** Inclusive value range of each element type (two's complement). */
export const ELEMENT_RANGES: Readonly<Record<ElementType, { readonly min: number; readonly max: number; readonly bytes: number }>> = {
  int8: { min: -128, max: 127, bytes: 1 },
  int16: { min: -32768, max: 32767, bytes: 2 },
  int32: { min: -2147483648, max: 2147483647, bytes: 4 },
};

/** The smallest element type holding every value from `min` to `max` (whole pixels); throws when not even int32 does. */
export function elementType(min: number, max: number): ElementType {
  for (const type of ELEMENT_TYPES) if (min >= ELEMENT_RANGES[type].min && max <= ELEMENT_RANGES[type].max) return type;
  throw new RangeError(
    `shift tables: values from ${min} to ${max} do not fit int32 (allowed ${ELEMENT_RANGES.int32.min} to ${ELEMENT_RANGES.int32.max}); use more fraction bits or halfTurn "flip"`,
  );
}
