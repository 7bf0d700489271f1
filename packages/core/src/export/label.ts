import { ExportOptionError } from "./exportOptionError.ts";

/**
 * Longest label prefix, in characters: the longest pair of external names that differ only at the end, `L_alpha_lo`
 * and `L_alpha_hi`, then still differ within the 31 significant characters C99 guarantees for external identifiers
 * (C99 5.2.4.1; from memory), which old linkers of small targets still apply.
 */
export const LABEL_MAX_LENGTH = 23;

const LABEL_FORM = /^[A-Za-z][A-Za-z0-9_]*$/;

/** What a label prefix may look like, for error messages. */
export const LABEL_ALLOWED = `a letter followed by up to ${LABEL_MAX_LENGTH - 1} letters, digits or underscores, not ending in "_", without "__", and not a C/C++ keyword or an assembler register name`;

// C99 6.4.1 and C++ [lex.key], [lex.digraph] (alternative tokens), from memory; C23 additions included.
const C_KEYWORDS = new Set(
  (
    "auto break case char const continue default do double else enum extern float for goto if inline int long register " +
    "restrict return short signed sizeof static struct switch typedef union unsigned void volatile while " +
    "alignas alignof bool constexpr false nullptr static_assert thread_local true typeof typeof_unqual " +
    "and and_eq asm bitand bitor catch char8_t char16_t char32_t class compl concept consteval constinit const_cast " +
    "co_await co_return co_yield decltype delete dynamic_cast explicit export friend mutable namespace new noexcept not " +
    "not_eq operator or or_eq private protected public reinterpret_cast requires static_cast template this throw try " +
    "typeid typename using virtual wchar_t xor xor_eq"
  ).split(" "),
);

function range(prefix: string, from: number, to: number): string[] {
  const out: string[] = [];
  for (let i = from; i <= to; i++) out.push(`${prefix}${i}`);
  return out;
}

// Register and condition names the four assembler dialects reserve (ca65, GNU as m68k/arm/z80 manuals; from memory). Compared case-insensitively.
const REGISTER_NAMES = new Set([
  // 6502 / 65816 (ca65)
  "a",
  "x",
  "y",
  "s",
  // 68000 (GNU as m68k)
  ...range("d", 0, 7),
  ...range("a", 0, 7),
  "sp",
  "fp",
  "pc",
  "sr",
  "ccr",
  "usp",
  "ssp",
  "msp",
  "isp",
  "vbr",
  "sfc",
  "dfc",
  "cacr",
  "caar",
  // ARM (GNU as)
  ...range("r", 0, 15),
  ...range("v", 1, 8),
  "ip",
  "lr",
  "sl",
  "sb",
  "tr",
  "apsr",
  "cpsr",
  "spsr",
  "fpscr",
  // Z80 / SM83 (GNU as z80): registers, pairs, index halves and condition codes
  "b",
  "c",
  "d",
  "e",
  "f",
  "h",
  "l",
  "i",
  "r",
  "af",
  "bc",
  "de",
  "hl",
  "ix",
  "iy",
  "ixh",
  "ixl",
  "iyh",
  "iyl",
  "hli",
  "hld",
  "nz",
  "z",
  "nc",
  "po",
  "pe",
  "p",
  "m",
]);

/** Why `label` cannot be a label prefix, or null when it can. */
function labelProblem(label: string): string | null {
  if (label.length === 0) return "empty";
  if (label.length > LABEL_MAX_LENGTH) return `${label.length} characters, more than ${LABEL_MAX_LENGTH}`;
  if (label.startsWith("_")) return "a leading underscore is reserved at file scope in C (C99 7.1.3)";
  if (!LABEL_FORM.test(label)) return "only letters, digits and underscores, starting with a letter";
  if (label.endsWith("_")) return 'ends in "_", so "L_h" would contain "__", reserved in C++';
  if (label.includes("__")) return '"__" is reserved in C++';
  if (C_KEYWORDS.has(label)) return "a C or C++ keyword";
  if (REGISTER_NAMES.has(label.toLowerCase())) return "an assembler register or condition name";
  return null;
}

/** Checks a label prefix (the L of `L_h`, `L_v`, …) and returns it; throws ExportOptionError naming `label` and the allowed form. */
export function checkLabel(label: unknown, field = "label"): string {
  if (typeof label !== "string") throw new ExportOptionError(field, label, LABEL_ALLOWED);
  const problem = labelProblem(label);
  if (problem) throw new ExportOptionError(field, label, LABEL_ALLOWED, problem);
  return label;
}

/** A valid label prefix made from an effect or file name: lower case, runs of other characters become "_", "fx_" in front of a digit. */
export function labelFromName(name: string): string {
  let slug = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "_")
    .replace(/^_+|_+$/g, "");
  if (/^[0-9]/.test(slug)) slug = `fx_${slug}`;
  slug = slug.slice(0, LABEL_MAX_LENGTH).replace(/_+$/, "");
  if (slug === "") return "effect";
  if (labelProblem(slug) !== null) slug = `${slug.slice(0, LABEL_MAX_LENGTH - 3)}_fx`;
  return checkLabel(slug);
}
