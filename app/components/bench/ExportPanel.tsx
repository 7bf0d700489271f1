/**
 * The export panel: outputs and options (the target profile's dialects and label prefix by default), the budget in
 * bytes as the options change, every file of the bundle in a read-only code view, and the zip built on the server.
 * The budget and the files come from core in the worker, with a progress bar for long tracks.
 */
import type { BudgetReport, Effect } from "@skewsmith/core";
import { useEffect, useMemo, useState } from "react";
import {
  ELEMENT_CHOICES,
  EXPORT_OUTPUTS,
  exportInput,
  exportZipHref,
  OUTPUT_LABELS,
  SIGNS,
  type ExportChoice,
} from "../../bench/exportChoice.ts";
import type { ExportFile } from "../../bench/protocol.ts";
import type { BenchWorker } from "../../bench/useBenchWorker.ts";
import { buttonClass } from "../ui.tsx";
import { CodeView, hexDump } from "./CodeView.tsx";
import { CheckField, SelectField, TextField } from "./fields.tsx";

/** Tables up to this many entries (frames × (width + height)) are exported as the options change; longer ones on request. */
const AUTO_EXPORT_ENTRIES = 400_000;

const SIGN_LABELS: Record<string, string> = {
  shift: "shift: +1 moves right or down",
  scroll: "scroll: negated, for registers that move the picture the other way",
};

function bytes(n: number): string {
  return n < 1024
    ? `${n} bytes`
    : n < 1024 * 1024
      ? `${(n / 1024).toFixed(1)} KiB (${n.toLocaleString("en")} bytes)`
      : `${(n / 1024 / 1024).toFixed(2)} MiB (${n.toLocaleString("en")} bytes)`;
}

export function ExportPanel({
  worker,
  document,
  effectId,
  effectName,
  defaults,
  savedVersion,
  dirty,
}: {
  worker: BenchWorker;
  document: Effect;
  effectId: string;
  effectName: string;
  defaults: ExportChoice;
  savedVersion: number;
  dirty: boolean;
}) {
  const [choice, setChoice] = useState<ExportChoice>(defaults);
  const [budget, setBudget] = useState<{ report: BudgetReport | null; error: string | null } | null>(null);
  // Files belong to the document and options they were made from; others' files are not shown.
  const [made, setMade] = useState<{ document: Effect; options: unknown; files: ExportFile[] } | null>(null);
  const [progress, setProgress] = useState<{ done: number; total: number; step: string } | null>(null);
  const [exportError, setExportError] = useState<string | null>(null);
  const [open, setOpen] = useState<string | null>(null);
  const checked = useMemo(() => exportInput(choice, effectName), [choice, effectName]);
  const budgetOf = worker.budget;
  const exportOf = worker.exportFiles;
  const files = made && made.document === document && checked.ok && made.options === checked.options ? made.files : null;
  const frames = "list" in document.angles ? document.angles.list.length : document.angles.sweep.frames;
  const entries = frames * (document.canvas.width + document.canvas.height);
  const auto = entries <= AUTO_EXPORT_ENTRIES;
  const set = <K extends keyof ExportChoice>(key: K, value: ExportChoice[K]) => setChoice((c) => ({ ...c, [key]: value }));

  useEffect(() => {
    if (!checked.ok) return;
    let live = true;
    const timer = setTimeout(() => {
      budgetOf(document, checked.options).then(
        (report) => live && setBudget({ report, error: null }),
        (error: Error) => live && setBudget({ report: null, error: error.message }),
      );
    }, 120);
    return () => {
      live = false;
      clearTimeout(timer);
    };
  }, [budgetOf, document, checked]);

  const make = () => {
    if (!checked.ok) return;
    const options = checked.options;
    setProgress({ done: 0, total: 1, step: "starting" });
    setExportError(null);
    exportOf(document, options, (done, total, step) => setProgress({ done, total, step })).then(
      (list) => {
        setMade({ document, options, files: list });
        setProgress(null);
        setOpen((o) =>
          o && list.some((f) => f.name === o) ? o : (list.find((f) => f.name !== "README.txt")?.name ?? list[0]?.name ?? null),
        );
      },
      (error: Error) => {
        setExportError(error.message);
        setProgress(null);
      },
    );
  };

  useEffect(() => {
    if (!auto || !checked.ok) return;
    const timer = setTimeout(make, 250);
    return () => clearTimeout(timer);
    // make reads the same inputs as these.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [auto, document, checked]);

  const openFile = files?.find((f) => f.name === open) ?? null;
  const openText = useMemo(
    () => (openFile ? (openFile.text ? new TextDecoder().decode(openFile.bytes) : hexDump(openFile.bytes)) : ""),
    [openFile],
  );
  const optionError = (field: string) => (!checked.ok && checked.field === field ? { [field]: checked.message } : undefined);
  const downloadOne = (file: ExportFile) => {
    const url = URL.createObjectURL(new Blob([file.bytes], { type: file.text ? "text/plain" : "application/octet-stream" }));
    const a = Object.assign(window.document.createElement("a"), { href: url, download: file.name });
    a.click();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  };

  return (
    <div className="grid gap-6 xl:grid-cols-[22rem_minmax(0,1fr)]" data-testid="export-panel">
      <div className="flex flex-col gap-4">
        <fieldset>
          <legend className="mb-1.5 text-xs font-medium text-ink-300">Outputs</legend>
          <div className="flex flex-col gap-1">
            {EXPORT_OUTPUTS.map((o) => (
              <CheckField
                key={o}
                name={`output-${o}`}
                label={OUTPUT_LABELS[o]}
                checked={choice.outputs.includes(o)}
                onChange={(on) =>
                  set(
                    "outputs",
                    EXPORT_OUTPUTS.filter((x) => (x === o ? on : choice.outputs.includes(x))),
                  )
                }
              />
            ))}
          </div>
          {!checked.ok && checked.field === "outputs" ? <p className="mt-1 text-xs text-alert-300">Choose at least one output.</p> : null}
        </fieldset>
        <TextField
          name="export-label"
          label="Label prefix"
          value={choice.label}
          onChange={(v) => set("label", v)}
          errors={optionError("label")}
          inputMode="text"
          hint="Tables are named label_h, label_v, …; files label.h, label.c, …"
        />
        <SelectField
          name="export-sign"
          label="Sign"
          value={choice.sign}
          onChange={(v) => set("sign", v as ExportChoice["sign"])}
          errors={optionError("sign")}
          options={SIGNS.map((s) => ({ value: s, label: SIGN_LABELS[s] ?? s }))}
        />
        <div className="grid grid-cols-2 gap-3">
          <TextField
            name="export-registerBits"
            label="Register width"
            suffix="bits"
            value={choice.registerBits}
            placeholder="none"
            onChange={(v) => set("registerBits", v)}
            errors={optionError("registerBits")}
            inputMode="numeric"
          />
          <SelectField
            name="export-element"
            label="Element type"
            value={choice.element}
            onChange={(v) => set("element", v as ExportChoice["element"])}
            errors={optionError("element")}
            options={ELEMENT_CHOICES.map((e) => ({ value: e, label: e }))}
          />
        </div>
        <div className="flex flex-col gap-1">
          <CheckField
            name="export-split"
            label="Split 16-bit tables into low and high bytes"
            checked={choice.split}
            onChange={(v) => set("split", v)}
          />
          <CheckField
            name="export-half"
            label="Store half of each antisymmetric table"
            checked={choice.half}
            onChange={(v) => set("half", v)}
          />
          <CheckField name="export-dedupe" label="Store identical frames once" checked={choice.dedupe} onChange={(v) => set("dedupe", v)} />
        </div>
        <div className="rounded-md border border-ink-700 bg-ink-950/60 p-3" data-testid="export-budget" aria-live="polite">
          <p className="text-xs font-medium text-ink-300">Budget</p>
          {!checked.ok ? (
            <p className="mt-1 text-sm text-alert-300">{checked.message}</p>
          ) : budget?.error ? (
            <p className="mt-1 text-sm text-alert-300">{budget.error}</p>
          ) : budget?.report ? (
            <>
              <p className="mt-1 text-lg text-ink-100" data-testid="budget-total">
                {bytes(budget.report.totalBytes)}
              </p>
              <p className="text-xs text-ink-400">
                of tables ({budget.report.element}, {budget.report.storedFrames} of {budget.report.frames} frames stored; with no options{" "}
                {bytes(budget.report.baselineBytes)})
              </p>
              <ul className="mt-2 flex flex-col gap-0.5 text-xs text-ink-300">
                {budget.report.outputs.map((o) => (
                  <li key={o.output} className="flex justify-between gap-2">
                    <span>{OUTPUT_LABELS[o.output]}</span>
                    <span className="num">{o.romBytes === null ? "not ROM data" : bytes(o.romBytes)}</span>
                  </li>
                ))}
              </ul>
              {budget.report.options.filter((o) => o.available && o.savingBytes).length > 0 ? (
                <ul className="mt-2 flex flex-col gap-0.5 text-xs text-ink-400">
                  {budget.report.options
                    .filter((o) => o.available && o.savingBytes)
                    .map((o) => (
                      <li key={o.option}>{o.note}</li>
                    ))}
                </ul>
              ) : null}
            </>
          ) : (
            <p className="mt-1 text-sm text-ink-400">Counting…</p>
          )}
        </div>
        <div className="flex flex-col gap-1.5">
          <a
            href={checked.ok ? exportZipHref(effectId, choice) : undefined}
            aria-disabled={!checked.ok}
            className={buttonClass("primary")}
            download
            data-testid="download-zip"
          >
            Download the zip (saved version {savedVersion})
          </a>
          <p className="text-xs text-ink-400">
            The zip is built on the server from the saved effect with these options.
            {dirty ? " Your unsaved edits are in the files shown here but not in the zip: save first." : ""}
          </p>
        </div>
      </div>

      <div className="min-w-0">
        {progress ? (
          <div className="mb-3" data-testid="export-progress">
            <label htmlFor="export-progress-bar" className="text-xs text-ink-300">
              Making the files: {progress.step} ({progress.done} of {progress.total})
            </label>
            <progress
              id="export-progress-bar"
              className="mt-1 block h-2 w-full accent-glass-400"
              max={progress.total}
              value={progress.done}
            />
          </div>
        ) : null}
        {exportError ? <p className="mb-3 text-sm text-alert-300">{exportError}</p> : null}
        {!auto && !files && !progress ? (
          <div className="mb-3 flex items-center gap-3">
            <button type="button" className={buttonClass("secondary")} onClick={make} disabled={!checked.ok}>
              Make the files
            </button>
            <p className="text-xs text-ink-400">
              {frames} frames of {document.canvas.width} + {document.canvas.height} shifts: made on request, with progress, while you keep
              working.
            </p>
          </div>
        ) : null}
        {files ? (
          <>
            <div role="tablist" aria-label="Files of the bundle" className="mb-2 flex flex-wrap gap-1">
              {files.map((f) => (
                <button
                  key={f.name}
                  type="button"
                  role="tab"
                  aria-selected={f.name === open}
                  aria-controls="export-file-view"
                  onClick={() => setOpen(f.name)}
                  className={`num rounded border px-2 py-1 text-xs ${f.name === open ? "border-glass-400 bg-glass-900 text-glass-200" : "border-ink-600 text-ink-300 hover:border-ink-400"}`}
                >
                  {f.name}{" "}
                  <span className={f.name === open ? "text-glass-300" : "text-ink-400"}>
                    {f.bytes.length < 1024 ? `${f.bytes.length} B` : `${(f.bytes.length / 1024).toFixed(1)} KiB`}
                  </span>
                </button>
              ))}
            </div>
            {openFile ? (
              <div id="export-file-view" role="tabpanel" aria-label={openFile.name}>
                <div className="mb-1 flex items-center justify-between gap-2">
                  <p className="text-xs text-ink-400">{openFile.text ? "Read-only view." : "Binary file: a hex dump of its bytes."}</p>
                  <button type="button" className={buttonClass("quiet", "sm")} onClick={() => downloadOne(openFile)}>
                    Download {openFile.name}
                  </button>
                </div>
                <CodeView name={openFile.name} text={openText} label={`Contents of ${openFile.name}`} />
              </div>
            ) : null}
          </>
        ) : null}
      </div>
    </div>
  );
}
