import { describe, expect, it } from "vitest";
import { ELEMENT_RANGES, ELEMENT_TYPES, elementType } from "../src/index.ts";

describe("elementType: the smallest of int8, int16, int32 holding every entry (spec §4)", () => {
  it("lists the three types with their two's complement ranges (common practice)", () => {
    expect(ELEMENT_TYPES).toEqual(["int8", "int16", "int32"]);
    expect(ELEMENT_RANGES).toEqual({
      int8: { min: -128, max: 127, bytes: 1 },
      int16: { min: -32768, max: 32767, bytes: 2 },
      int32: { min: -2147483648, max: 2147483647, bytes: 4 },
    });
  });

  it.each([
    [0, 0, "int8"],
    [-128, 127, "int8"],
    [-129, 0, "int16"],
    [0, 128, "int16"],
    [-32768, 32767, "int16"],
    [-32769, 0, "int32"],
    [0, 32768, "int32"],
    [-2147483648, 2147483647, "int32"],
  ])("values %i … %i fit %s", (min, max, type) => {
    expect(elementType(min, max)).toBe(type);
  });

  it("throws, naming the values and the int32 range, when not even int32 holds them", () => {
    expect(() => elementType(0, 2147483648)).toThrow(/2147483648.*int32/);
    expect(() => elementType(-2147483649, 0)).toThrow(RangeError);
  });
});
