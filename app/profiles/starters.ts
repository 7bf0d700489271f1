/**
 * Generic starting target profiles, described by screen size and CPU family (no product names). A team is
 * offered them when it is created and from its profiles page. Every hardware value below is from memory, as
 * marked beside it: check it against your target's documentation before you burn a cartridge.
 */
import type { TargetProfileInput } from "../effects/settings.ts";

export interface StarterProfile {
  /** A stable handle for forms and links. */
  key: string;
  settings: Omit<TargetProfileInput, "exportOptions"> & { exportOptions: TargetProfileInput["exportOptions"] };
}

export const STARTER_PROFILES: readonly StarterProfile[] = [
  {
    key: "6502-256x240",
    settings: {
      name: "256 × 240, 6502 family, Q8.8",
      description:
        "Full screen of an 8-bit console with a 6502-family CPU: rows by a scroll write per line, columns by 8-pixel tile columns.",
      canvasWidth: 256, // from memory: 256 visible pixels per line
      canvasHeight: 240, // from memory: 240 lines in the picture the console draws
      fixedPointBits: 16, // common practice on 8-bit CPUs: an 8.8 pair of bytes
      fixedPointFraction: 8,
      rounding: "nearest-away",
      halfTurn: "flip", // from memory: sprites carry mirror bits; background tiles do not, so a background may want "shear"
      edges: "wrap", // from memory: the background scroll wraps around its maps
      columnGroup: 8, // from memory: no per-column scroll, so columns move as 8-pixel tile columns
      dialects: ["6502", "bin"],
      labelPrefix: "",
      // No colour limit: palettes differ by mode on every family; the team sets the one its target has.
      maxColours: null,
      exportOptions: {
        sign: "scroll", // from memory: a larger scroll value moves the picture left / up
        split: true, // common practice on the 6502: separate low-byte and high-byte tables for indexed loads
      },
    },
  },
  {
    key: "68000-320x224",
    settings: {
      name: "320 × 224, 68000, Q16.16, 16-pixel column groups",
      description: "Full screen of a 16-bit console with a 68000 CPU: per-line horizontal scroll and vertical scroll in 16-pixel columns.",
      canvasWidth: 320, // from memory: 320 pixels per line in the wide mode
      canvasHeight: 224, // from memory: 224 lines on 60 Hz machines
      fixedPointBits: 32, // common practice on the 68000: a 16.16 long word
      fixedPointFraction: 16,
      rounding: "nearest-away",
      halfTurn: "flip", // from memory: tiles and sprites both carry mirror bits
      edges: "wrap", // from memory: the scroll planes wrap around
      columnGroup: 16, // from memory: vertical scroll per column works on 16-pixel (two-tile) columns
      dialects: ["68k", "c", "bin"],
      labelPrefix: "",
      // No colour limit: palettes differ by mode on every family; the team sets the one its target has.
      maxColours: null,
      exportOptions: {},
    },
  },
  {
    key: "sm83-160x144",
    settings: {
      name: "160 × 144, SM83 handheld, Q8.8",
      description: "Screen of an 8-bit handheld with an SM83 (Z80-like) CPU: rows by a scroll write per line, columns by 8-pixel tiles.",
      canvasWidth: 160, // from memory: 160 pixels per line
      canvasHeight: 144, // from memory: 144 lines
      fixedPointBits: 16, // common practice on 8-bit CPUs: an 8.8 pair of bytes
      fixedPointFraction: 8,
      rounding: "nearest-away",
      halfTurn: "flip", // from memory: sprites carry mirror bits (background tiles only on the colour models)
      edges: "wrap", // from memory: the background map wraps around
      columnGroup: 8, // from memory: no per-column scroll, so columns move as 8-pixel tile columns
      dialects: ["z80", "bin"],
      labelPrefix: "",
      // No colour limit: palettes differ by mode on every family; the team sets the one its target has.
      maxColours: null,
      exportOptions: {
        sign: "scroll", // from memory: the scroll registers move the view, so the picture moves the other way
      },
    },
  },
  {
    key: "arm-240x160",
    settings: {
      name: "240 × 160, ARM handheld, Q8.8",
      description: "Screen of a 32-bit handheld with an ARM CPU: per-line scroll from the horizontal blank, columns by 8-pixel tiles.",
      canvasWidth: 240, // from memory: 240 pixels per line
      canvasHeight: 160, // from memory: 160 lines
      fixedPointBits: 16, // from memory: the video chip's own scale and rotate registers use 8.8 fixed point
      fixedPointFraction: 8,
      rounding: "nearest-away",
      halfTurn: "flip", // from memory: text-mode tiles and sprites carry mirror bits
      edges: "wrap", // from memory: text backgrounds wrap around
      columnGroup: 8, // from memory: no per-column scroll in the tiled modes, so columns move as 8-pixel tile columns
      dialects: ["arm", "c", "bin"],
      labelPrefix: "",
      // No colour limit: palettes differ by mode on every family; the team sets the one its target has.
      maxColours: null,
      exportOptions: {
        sign: "scroll", // from memory: a larger scroll value moves the background left / up
      },
    },
  },
];

const BY_KEY = new Map(STARTER_PROFILES.map((s) => [s.key, s]));

/** The starting profile with this key, or undefined (a Map, so a key such as "__proto__" or "constructor" finds nothing). */
export function starterProfile(key: string): StarterProfile | undefined {
  return BY_KEY.get(key);
}
