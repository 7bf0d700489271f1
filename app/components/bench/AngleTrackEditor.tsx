/**
 * The angle list in a CodeMirror editor, one angle in degrees per line; every line core refuses is marked in the
 * editor (underline and gutter, message on hover) and listed below it for keyboards and screen readers.
 */
import { defaultKeymap, history, historyKeymap } from "@codemirror/commands";
import { lintGutter, setDiagnostics, type Diagnostic } from "@codemirror/lint";
import { EditorState, Compartment } from "@codemirror/state";
import { EditorView, keymap, lineNumbers } from "@codemirror/view";
import { useEffect, useRef } from "react";
import { benchEditorTheme } from "./codeTheme.ts";

export function AngleTrackEditor({
  value,
  onChange,
  badLines,
  readOnly,
  labelledBy,
  describedBy,
}: {
  value: string;
  onChange: (value: string) => void;
  badLines: { line: number; message: string }[];
  readOnly: boolean;
  labelledBy: string;
  describedBy?: string;
}) {
  const host = useRef<HTMLDivElement>(null);
  const view = useRef<EditorView | null>(null);
  const editable = useRef(new Compartment());
  const onChangeRef = useRef(onChange);
  useEffect(() => {
    onChangeRef.current = onChange;
  }, [onChange]);

  useEffect(() => {
    if (!host.current) return;
    const v = new EditorView({
      parent: host.current,
      state: EditorState.create({
        doc: value,
        extensions: [
          lineNumbers(),
          history(),
          keymap.of([...defaultKeymap, ...historyKeymap]),
          lintGutter(),
          benchEditorTheme,
          editable.current.of([EditorState.readOnly.of(readOnly), EditorView.editable.of(!readOnly)]),
          EditorView.contentAttributes.of({
            "aria-labelledby": labelledBy,
            ...(describedBy ? { "aria-describedby": describedBy } : {}),
            "aria-multiline": "true",
            role: "textbox",
            tabindex: "0",
          }),
          EditorView.updateListener.of((update) => {
            if (update.docChanged) onChangeRef.current(update.state.doc.toString());
          }),
        ],
      }),
    });
    view.current = v;
    return () => {
      v.destroy();
      view.current = null;
    };
    // The editor is made once; value and marks follow through the effects below.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  // A value set from outside (a restored draft, a merge, switching from a sweep) replaces the text.
  useEffect(() => {
    const v = view.current;
    if (!v || v.state.doc.toString() === value) return;
    v.dispatch({ changes: { from: 0, to: v.state.doc.length, insert: value } });
  }, [value]);

  useEffect(() => {
    view.current?.dispatch({
      effects: editable.current.reconfigure([EditorState.readOnly.of(readOnly), EditorView.editable.of(!readOnly)]),
    });
  }, [readOnly]);

  useEffect(() => {
    const v = view.current;
    if (!v) return;
    const doc = v.state.doc;
    const diagnostics: Diagnostic[] = badLines
      .filter((b) => b.line >= 1 && b.line <= doc.lines)
      .map((b) => {
        const line = doc.line(b.line);
        return { from: line.from, to: Math.max(line.from, line.to), severity: "error", message: b.message };
      });
    v.dispatch(setDiagnostics(v.state, diagnostics));
  }, [badLines, value]);

  return (
    <div>
      <div
        ref={host}
        className="max-h-64 overflow-auto rounded-md border border-ink-600 bg-ink-950 text-sm"
        data-testid="angle-list-editor"
      />
      {badLines.length > 0 ? (
        <ul className="mt-1.5 flex flex-col gap-0.5 text-xs text-alert-300" data-testid="angle-list-errors">
          {badLines.slice(0, 12).map((b) => (
            <li key={b.line}>{b.message}</li>
          ))}
          {badLines.length > 12 ? <li>… and {badLines.length - 12} more bad lines</li> : null}
        </ul>
      ) : null}
    </div>
  );
}
