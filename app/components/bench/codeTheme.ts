/** CodeMirror's look on the bench: the app's dark colours, and a highlight style readable on them (for C, assembler, JSON). */
import { HighlightStyle, syntaxHighlighting } from "@codemirror/language";
import { EditorView } from "@codemirror/view";
import { tags as t } from "@lezer/highlight";
import { pageNonce } from "../../nonce.ts";

const theme = EditorView.theme(
  {
    "&": { backgroundColor: "var(--color-ink-950)", color: "var(--color-ink-100)", fontSize: "12.5px" },
    ".cm-content": { fontFamily: "var(--font-mono)", caretColor: "var(--color-glass-300)" },
    ".cm-gutters": { backgroundColor: "var(--color-ink-900)", color: "var(--color-ink-400)", border: "none" },
    ".cm-activeLine": { backgroundColor: "#ffffff08" },
    ".cm-activeLineGutter": { backgroundColor: "#ffffff0c" },
    "&.cm-focused": { outline: "2px solid var(--color-glass-400)", outlineOffset: "-2px" },
    ".cm-selectionBackground, &.cm-focused .cm-selectionBackground": { backgroundColor: "var(--color-glass-700) !important" },
    ".cm-lintRange-error": { backgroundImage: "none", textDecoration: "underline wavy var(--color-alert-400)", textUnderlineOffset: "3px" },
    ".cm-tooltip": { backgroundColor: "var(--color-ink-800)", color: "var(--color-ink-100)", border: "1px solid var(--color-ink-600)" },
  },
  { dark: true },
);

/** Colours chosen for at least 4.5:1 against the editor's background (checked with axe in the browser tests). */
const highlight = HighlightStyle.define([
  { tag: [t.comment, t.lineComment, t.blockComment], color: "#8fa0ad" },
  { tag: [t.keyword, t.controlKeyword, t.modifier], color: "#86dccb" },
  { tag: [t.typeName, t.standard(t.typeName)], color: "#9ecbff" },
  { tag: [t.number, t.integer, t.float, t.bool, t.atom], color: "#f2c48d" },
  { tag: [t.string, t.special(t.string)], color: "#c3e88d" },
  { tag: [t.definition(t.variableName), t.labelName, t.function(t.variableName)], color: "#e3e8ec", fontWeight: "600" },
  { tag: [t.meta, t.processingInstruction, t.macroName], color: "#d7b4f3" },
  { tag: [t.variableName, t.propertyName], color: "#c9d1d8" },
  { tag: [t.operator, t.punctuation, t.bracket], color: "#a9b4be" },
  { tag: t.standard(t.variableName), color: "#d7b4f3" },
]);

/**
 * The editors' look, and the page's policy nonce for the <style> element CodeMirror adds (the page's
 * Content-Security-Policy allows no other): read where the editors run, in the browser.
 */
export const benchEditorTheme = [theme, syntaxHighlighting(highlight), EditorView.cspNonce.of(pageNonce() ?? "")];
