import type { Effect } from "../effect.ts";
import type { ExportLayout } from "./layout.ts";

/** Longest comment line the exporters write, in characters (fits an 80-column editor with a comment prefix). */
const LINE = 76;

/** The file name of the effect document inside a bundle, from which every file can be regenerated. */
export function effectFileName(label: string): string {
  return `${label}.effect.json`;
}

/**
 * Free text (an effect name) made safe for every comment style: printable ASCII only, no C comment delimiters, no
 * trigraph starts or backslashes (gcc -Wall warns on "/*" inside a comment and on trigraphs; from memory).
 */
export function commentSafe(text: string): string {
  return text
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^\x20-\x7e]/g, "_")
    .replace(/\\/g, "/")
    .replace(/\?\?/g, "?_")
    .replace(/\/\*/g, "/ *")
    .replace(/\*\//g, "* /");
}

function num(x: number): string {
  return String(Number(x.toFixed(6)));
}

function trackLine(effect: Effect): string {
  const a = effect.angles;
  if ("sweep" in a) {
    const s = a.sweep;
    return `angle track: sweep from ${num(s.from)} to ${num(s.to)} deg, ${s.frames} frames, ${s.easing}, end ${s.includeEnd ? "included" : "excluded"}`;
  }
  const shown = a.list.slice(0, 12).map(num).join(", ");
  return `angle track: list of ${a.list.length} angles (deg): ${shown}${a.list.length > 12 ? ", ... (all in the effect document below)" : ""}`;
}

/** The skewsmith command line that makes the same files from the bundle's effect document. */
export function regenerateCommand(layout: ExportLayout, outDir = "DIR"): string {
  const o = layout.options;
  const parts = ["skewsmith export", effectFileName(layout.label), "--out", outDir, "--label", layout.label];
  parts.push("--outputs", o.outputs.join(","), "--sign", o.sign);
  if (o.registerBits !== null) parts.push("--register-bits", String(o.registerBits));
  parts.push("--element", o.element);
  if (o.split) parts.push("--split");
  if (o.half) parts.push("--half");
  if (o.dedupe) parts.push("--dedupe");
  return parts.join(" ");
}

/** Breaks `text` into lines of at most `width` characters after commas (JSON stays valid when the lines are joined again). */
export function wrapAfterCommas(text: string, width = LINE): string[] {
  const lines: string[] = [];
  let line = "";
  for (const piece of text.split(/(?<=,)/)) {
    if (line.length > 0 && line.length + piece.length > width) {
      lines.push(line);
      line = "";
    }
    line += piece;
  }
  if (line) lines.push(line);
  return lines;
}

/** Breaks prose into lines of at most `width` characters at spaces. */
export function wrapWords(text: string, width = LINE): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of text.split(" ")) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}

/** Every parameter that produced an export, one line each, and how to regenerate it. */
export function settingsLines(layout: ExportLayout): string[] {
  const { effect, options: o } = layout;
  const fp = effect.fixedPoint;
  const half = !o.half
    ? "no"
    : layout.halfH && layout.halfV
      ? "h and v (both antisymmetric)"
      : layout.halfH
        ? "h only (v is not antisymmetric)"
        : "v only (h is not antisymmetric)";
  const lines = [
    `Skewsmith export${o.name ? ` of effect "${commentSafe(o.name)}"` : ""}, label ${layout.label}`,
    `canvas: ${effect.canvas.width} x ${effect.canvas.height} pixels; pivot: (${num(effect.pivot.x)}, ${num(effect.pivot.y)}) in pixel-edge coordinates`,
    trackLine(effect),
    `fixed point: signed ${fp.bits}-bit, ${fp.fraction} fraction bits (Q${fp.bits - fp.fraction}.${fp.fraction})`,
    `rounding: ${effect.rounding}; half turn: ${effect.halfTurn}; edges: ${effect.edges}; column group: ${effect.columnGroup}`,
    `element type: ${layout.element.name}${o.element === "auto" ? " (auto)" : " (forced)"}; coefficients: ${layout.coefficient.name}`,
    o.sign === "shift"
      ? "sign: shift (as computed: +1 moves a row right, a column down)"
      : "sign: scroll (negated: +1 moves a row left, a column up)",
    `register width: ${o.registerBits === null ? "none (signed values)" : `${o.registerBits} bits (values wrapped modulo ${2 ** o.registerBits}, unsigned)`}`,
    `split into low/high bytes: ${o.split ? `yes (${layout.splitRoles.join(", ")})` : "no"}`,
    `half tables: ${half}`,
    `dedupe identical frames: ${o.dedupe ? `yes, ${layout.storedFrames} of ${layout.frames} frames stored` : "no"}`,
    `frames: ${layout.frames}; stored: ${layout.storedFrames}`,
    "regenerate with:",
    `  ${regenerateCommand(layout)}`,
    ...layout.notes.flatMap((n) => wrapWords(`note: ${n}`, LINE - 2).map((l, i) => (i ? `  ${l}` : l))),
  ];
  return lines;
}

/** The settings lines, then the effect document itself: the comment header of every file, enough to regenerate it. */
export function parameterLines(layout: ExportLayout): string[] {
  return [
    ...settingsLines(layout),
    `effect document (${effectFileName(layout.label)}):`,
    ...wrapAfterCommas(JSON.stringify(layout.effect)),
  ];
}

/** One line per table: symbol, dimensions, type and bytes, then what it holds; for every output's header. */
export function tableSummaryLines(layout: ExportLayout): string[] {
  const out: string[] = [];
  for (const t of layout.tables) {
    out.push(`${t.name}[${t.dims.join("][")}]: ${t.type.name}, ${t.bytes} bytes`);
    out.push(...wrapWords(t.description, LINE - 6).map((l) => `    ${l}`));
  }
  return out;
}
