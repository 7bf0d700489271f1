/** The integer types an exported table can be stored as: the spec's signed element types plus unsigned ones for register-wrapped values. */
export const STORAGE_TYPES = ["int8", "uint8", "int16", "uint16", "int32", "uint32"] as const;
export type StorageTypeName = (typeof STORAGE_TYPES)[number];

/** One storage type: its width in bytes, signedness, inclusive value range and C99 `<stdint.h>` name. */
export interface StorageType {
  readonly name: StorageTypeName;
  readonly bytes: 1 | 2 | 4;
  readonly signed: boolean;
  readonly min: number;
  readonly max: number;
  readonly c: string;
}

function make(name: StorageTypeName, bytes: 1 | 2 | 4, signed: boolean): StorageType {
  const bits = bytes * 8;
  return signed
    ? { name, bytes, signed, min: -(2 ** (bits - 1)), max: 2 ** (bits - 1) - 1, c: `${name}_t` }
    : { name, bytes, signed, min: 0, max: 2 ** bits - 1, c: `${name}_t` };
}

/** Every storage type by name (two's complement for the signed ones, as `<stdint.h>` requires of intN_t; C99 7.18.1.1). */
export const STORAGE: Readonly<Record<StorageTypeName, StorageType>> = {
  int8: make("int8", 1, true),
  uint8: make("uint8", 1, false),
  int16: make("int16", 2, true),
  uint16: make("uint16", 2, false),
  int32: make("int32", 4, true),
  uint32: make("uint32", 4, false),
};

/** The smallest signed (or, with `unsigned`, unsigned) storage type holding every value from `min` to `max`, or null when none does. */
export function smallestStorage(min: number, max: number, unsigned: boolean): StorageType | null {
  for (const name of STORAGE_TYPES) {
    const t = STORAGE[name];
    if (t.signed === unsigned) continue;
    if (min >= t.min && max <= t.max) return t;
  }
  return null;
}

/** The two's complement bit pattern of `value` in `bytes` bytes, as a non-negative integer (what an assembler without negative operands needs). */
export function twosComplement(value: number, bytes: 1 | 2 | 4): number {
  const m = 2 ** (bytes * 8);
  return ((value % m) + m) % m;
}
