/** A read-only CodeMirror view of one export file, highlighted as C, assembler or JSON (legacy modes); binaries as a hex dump. */
import { StreamLanguage, type StreamParser } from "@codemirror/language";
import { c } from "@codemirror/legacy-modes/mode/clike";
import { gas, gasArm } from "@codemirror/legacy-modes/mode/gas";
import { json } from "@codemirror/legacy-modes/mode/javascript";
import { z80 } from "@codemirror/legacy-modes/mode/z80";
import { EditorState, type Extension } from "@codemirror/state";
import { EditorView, lineNumbers } from "@codemirror/view";
import { useEffect, useRef } from "react";
import { benchEditorTheme } from "./codeTheme.ts";

/** Longest text shown in the view, in characters; the rest is in the zip (a 4096-frame table runs to many megabytes). */
export const CODE_VIEW_MAX = 2_000_000;

/**
 * A mode for assemblers whose whole-line comments start with `mark` (";" for ca65, "*" for 68000 sources), on top of a
 * GNU as mode for the rest of the line.
 */
function withLineComment<S>(mode: StreamParser<S>, mark: string): StreamParser<S> {
  return {
    ...mode,
    name: `${mode.name ?? "asm"}-${mark}`,
    token(stream, state) {
      if ((mark === "*" ? stream.sol() : true) && stream.peek() === mark) {
        stream.skipToEnd();
        return "comment";
      }
      return mode.token(stream, state);
    },
  };
}

/** The highlighting for a file of the bundle, by its name. */
export function languageFor(name: string): Extension {
  if (/\.(c|h)$/.test(name)) return StreamLanguage.define(c);
  if (name.endsWith(".json")) return StreamLanguage.define(json);
  if (name.endsWith(".z80.s")) return StreamLanguage.define(z80);
  if (name.endsWith(".arm.s")) return StreamLanguage.define(gasArm);
  if (name.endsWith(".68k.s")) return StreamLanguage.define(withLineComment(gas, "*"));
  if (name.endsWith(".6502.s")) return StreamLanguage.define(withLineComment(gas, ";"));
  return [];
}

/** A hex dump: offset, sixteen bytes, their printable characters. */
export function hexDump(bytes: Uint8Array, max = 64 * 1024): string {
  const lines: string[] = [];
  const n = Math.min(bytes.length, max);
  for (let o = 0; o < n; o += 16) {
    const row = bytes.subarray(o, Math.min(o + 16, n));
    const hex = Array.from(row, (b) => b.toString(16).padStart(2, "0")).join(" ");
    const text = Array.from(row, (b) => (b >= 32 && b < 127 ? String.fromCharCode(b) : ".")).join("");
    lines.push(`${o.toString(16).padStart(8, "0")}  ${hex.padEnd(47)}  ${text}`);
  }
  if (bytes.length > n) lines.push(`… ${bytes.length - n} more bytes (the whole file is in the zip)`);
  return lines.join("\n");
}

export function CodeView({ name, text, label }: { name: string; text: string; label: string }) {
  const host = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!host.current) return;
    const shown =
      text.length > CODE_VIEW_MAX ? `${text.slice(0, CODE_VIEW_MAX)}\n… (the view stops here; the whole file is in the zip)` : text;
    const view = new EditorView({
      parent: host.current,
      state: EditorState.create({
        doc: shown,
        extensions: [
          lineNumbers(),
          EditorState.readOnly.of(true),
          benchEditorTheme,
          languageFor(name),
          EditorView.contentAttributes.of({
            "aria-label": label,
            "aria-readonly": "true",
            role: "textbox",
            "aria-multiline": "true",
            tabindex: "0",
          }),
        ],
      }),
    });
    return () => view.destroy();
  }, [name, text, label]);
  return (
    <div
      ref={host}
      className="h-[28rem] overflow-hidden rounded-md border border-ink-700 [&_.cm-editor]:h-full"
      data-testid="code-view"
      data-file={name}
    />
  );
}
