import { useEffect, useRef, useState, type DragEvent, type ReactNode } from "react";
import { useFetcher } from "react-router";
import type { ActionResult } from "../forms.ts";
import { NAME_MAX } from "../forms.ts";
import { PNG_HEADER_BYTES, readPngHeader, SPRITE_MAX_BYTES, SPRITE_MAX_SIDE, SpriteFileError } from "../sprites/pngHeader.ts";
import { Button, Field, TextInput } from "./ui.tsx";

/** What the browser learnt from a chosen file before sending it: its header facts, or why it will be refused. */
export interface FileCheck {
  name: string;
  size: number;
  facts?: string;
  error?: string;
}

/** Bytes in words: "812 bytes", "3.4 KiB", "1.20 MiB". */
export function byteWords(n: number): string {
  if (n < 1024) return `${n} byte${n === 1 ? "" : "s"}`;
  const [value, unit] = n < 1024 * 1024 ? [n / 1024, "KiB"] : [n / 1024 / 1024, "MiB"];
  return `${Number.isInteger(value) ? value : value.toFixed(value < 10 ? 2 : 1)} ${unit}`;
}

/** The same size and header checks the server runs first, on the file's size and its first 33 bytes. */
export async function checkFile(file: File): Promise<FileCheck> {
  const base = { name: file.name, size: file.size };
  if (file.size > SPRITE_MAX_BYTES)
    return { ...base, error: `The file is ${file.size} bytes; sprites can be at most ${SPRITE_MAX_BYTES} bytes (4 MiB).` };
  try {
    const header = readPngHeader(new Uint8Array(await file.slice(0, PNG_HEADER_BYTES).arrayBuffer()));
    return {
      ...base,
      facts: `${header.width} × ${header.height} px · ${header.kind === "indexed" ? "indexed (palette)" : "RGBA"} · ${byteWords(file.size)}`,
    };
  } catch (error) {
    if (error instanceof SpriteFileError) return { ...base, error: error.message };
    throw error;
  }
}

/** Puts a dropped file into a file input, as if it had been chosen there. */
export function putFile(input: HTMLInputElement, file: File): void {
  const transfer = new DataTransfer();
  transfer.items.add(file);
  input.files = transfer.files;
}

/** A file input that also takes a PNG dropped on it, with the header checked in the browser before anything is sent. */
export function DropZone({
  id,
  label,
  hint,
  error,
  onChecked,
}: {
  id: string;
  label: string;
  hint: ReactNode;
  error?: string;
  onChecked?: (check: FileCheck | null) => void;
}) {
  const input = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const [check, setCheck] = useState<FileCheck | null>(null);
  const [note, setNote] = useState<string | null>(null);
  const inspect = async (file: File | undefined) => {
    const result = file ? await checkFile(file) : null;
    setCheck(result);
    onChecked?.(result);
  };
  const drop = (event: DragEvent) => {
    event.preventDefault();
    setOver(false);
    const files = event.dataTransfer.files;
    if (!files.length || !input.current) return;
    putFile(input.current, files[0]);
    setNote(files.length > 1 ? `You dropped ${files.length} files; one sprite is added at a time, so this takes ${files[0].name}.` : null);
    void inspect(files[0]);
  };
  // A reset of the form (after an upload went through) empties the input: forget what it held.
  useEffect(() => {
    const owner = input.current?.form;
    const forget = () => {
      setCheck(null);
      setNote(null);
      onChecked?.(null);
    };
    owner?.addEventListener("reset", forget);
    return () => owner?.removeEventListener("reset", forget);
  }, [onChecked]);
  const shown = check?.error ?? error;
  return (
    <div
      data-testid={`${id}-zone`}
      onDragOver={(event) => {
        event.preventDefault();
        event.dataTransfer.dropEffect = "copy";
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={drop}
      className={`flex flex-col gap-2 rounded-md border border-dashed px-4 py-4 transition-colors ${
        over ? "border-glass-400 bg-glass-900/40" : shown ? "border-alert-400" : "border-ink-600"
      }`}
    >
      <label htmlFor={id} className="text-xs font-medium uppercase tracking-wide text-ink-400">
        {label}
      </label>
      <input
        ref={input}
        id={id}
        name="file"
        type="file"
        accept="image/png,.png"
        aria-invalid={shown ? true : undefined}
        aria-describedby={`${id}-help`}
        onChange={(event) => {
          setNote(null);
          void inspect(event.currentTarget.files?.[0]);
        }}
        className="text-sm text-ink-200 file:mr-3 file:cursor-pointer file:rounded-md file:border file:border-ink-600 file:bg-ink-800 file:px-3 file:py-1.5 file:text-sm file:text-ink-100 hover:file:border-ink-400"
      />
      <div id={`${id}-help`} className="text-xs text-ink-400">
        {hint}
      </div>
      {note ? <p className="text-xs text-ink-300">{note}</p> : null}
      {check?.facts && !shown ? (
        <p className="num text-xs text-glass-300" data-testid={`${id}-facts`}>
          {check.name} · {check.facts}
        </p>
      ) : null}
      {shown ? (
        <p className="text-sm text-alert-300" role="alert">
          {shown}
        </p>
      ) : null}
    </div>
  );
}

/** The upload form: a PNG by file input or drag-and-drop, an optional name (the file's own by default). */
export function SpriteUpload({ action, fetcherKey }: { action: string; fetcherKey: string }) {
  const fetcher = useFetcher<ActionResult>({ key: fetcherKey });
  const form = useRef<HTMLFormElement>(null);
  const [check, setCheck] = useState<FileCheck | null>(null);
  const [fresh, setFresh] = useState(false);
  const busy = fetcher.state !== "idle";
  const result = fetcher.data;
  const errors = !fresh && result && !result.ok ? result.errors : undefined;
  // Once an upload went through, empty the form for the next one (the drop zone forgets its file on the reset).
  useEffect(() => {
    if (fetcher.state === "idle" && result?.ok) form.current?.reset();
  }, [result, fetcher.state]);
  return (
    <fetcher.Form
      ref={form}
      method="post"
      action={action}
      encType="multipart/form-data"
      aria-label="Upload a sprite"
      noValidate
      onSubmit={(event) => {
        setFresh(false);
        if (check?.error) event.preventDefault();
      }}
      className="grid gap-3 md:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] md:items-start"
    >
      <DropZone
        id="sprite-file"
        label="PNG file"
        error={errors?.file}
        onChecked={(c) => {
          setCheck(c);
          setFresh(true);
        }}
        hint={
          <>
            Drop a PNG here or choose one: indexed (palette, index 0 is the background) or RGBA, at most {byteWords(SPRITE_MAX_BYTES)} and{" "}
            {SPRITE_MAX_SIDE} × {SPRITE_MAX_SIDE} pixels.
          </>
        }
      />
      <div className="flex flex-col gap-3">
        <Field label="Sprite name" name="sprite-name" error={errors?.name} hint="Leave empty to use the file's name.">
          <TextInput
            id="sprite-name"
            name="name"
            maxLength={NAME_MAX}
            placeholder={check?.name ?? "the file's name"}
            error={errors?.name}
          />
        </Field>
        {errors?.form ? (
          <p className="text-sm text-alert-300" role="alert">
            {errors.form}
          </p>
        ) : null}
        <div>
          <Button variant="primary" name="intent" value="upload-sprite" disabled={busy || Boolean(check?.error)}>
            {busy ? "Uploading…" : "Upload sprite"}
          </Button>
        </div>
      </div>
    </fetcher.Form>
  );
}
