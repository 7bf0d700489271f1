/**
 * Reading request bodies as an attacker may send them. Every action and API route reads its body through
 * these: a body of the wrong kind is a 415, a broken or oversized one a 400 or 413, never a 500. What they
 * throw is a `data({ message }, { status })` response, the same shape the guards throw.
 */
import { data } from "react-router";

/** Largest form body without a file, in bytes (names, descriptions and settings fit many times over). */
export const FORM_MAX_BYTES = 256 * 1024;
/** Largest JSON body of an API call, in bytes: an effect document with a 4096-angle list fits well inside. */
export const JSON_MAX_BYTES = 1024 * 1024;

function fail(status: number, message: string): never {
  throw data({ message }, { status });
}

/** The media type of a request, lower-case, without parameters ("" when there is none). */
export function mediaType(request: Request): string {
  return (request.headers.get("Content-Type") ?? "").split(";")[0].trim().toLowerCase();
}

/** Reads at most `maxBytes` of the body; 413 beyond that, whatever Content-Length claims. */
async function readBounded(request: Request, maxBytes: number): Promise<Uint8Array<ArrayBuffer>> {
  const declared = Number(request.headers.get("Content-Length") ?? "NaN");
  if (Number.isFinite(declared) && declared > maxBytes)
    fail(413, `The request body is ${declared} bytes; at most ${maxBytes} are accepted here.`);
  if (!request.body) return new Uint8Array(new ArrayBuffer(0));
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    let chunk: ReadableStreamReadResult<Uint8Array>;
    try {
      chunk = await reader.read();
    } catch {
      return fail(400, "The request body could not be read to its end.");
    }
    if (chunk.done) break;
    size += chunk.value.byteLength;
    if (size > maxBytes) {
      await reader.cancel().catch(() => {});
      fail(413, `The request body is larger than ${maxBytes} bytes, the most accepted here.`);
    }
    chunks.push(chunk.value);
  }
  const out = new Uint8Array(new ArrayBuffer(size));
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

/**
 * The request's form: 415 unless it is `application/x-www-form-urlencoded` or `multipart/form-data`, 413 beyond
 * `maxBytes`, 400 when the body does not parse as the form it claims to be.
 */
export async function readForm(request: Request, options: { maxBytes?: number } = {}): Promise<FormData> {
  const type = mediaType(request);
  if (type !== "application/x-www-form-urlencoded" && type !== "multipart/form-data")
    fail(
      415,
      `This address takes a form (application/x-www-form-urlencoded or multipart/form-data), not ${type || "a body without a Content-Type"}.`,
    );
  const body = await readBounded(request, options.maxBytes ?? FORM_MAX_BYTES);
  try {
    return await new Request("http://local/", {
      method: "POST",
      headers: { "Content-Type": request.headers.get("Content-Type") ?? type },
      body,
    }).formData();
  } catch {
    return fail(400, "The form could not be read: its body is not valid for its Content-Type.");
  }
}

/** Deepest nesting of lists and objects a JSON body may have: far more than any document of the API needs. */
export const JSON_MAX_DEPTH = 64;

/**
 * How deep the lists and objects of JSON text nest, counted without parsing (brackets inside strings do not count), so
 * that a body of nothing but brackets is refused before anything walks it recursively. Stops counting past the limit.
 */
export function nestingDepth(text: string): number {
  let depth = 0;
  let deepest = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 0x5c)
        i++; // a backslash: the next character is escaped
      else if (c === 0x22) inString = false;
    } else if (c === 0x22) inString = true;
    else if (c === 0x5b || c === 0x7b) {
      depth++;
      if (depth > deepest) deepest = depth;
      if (deepest > JSON_MAX_DEPTH) return deepest;
    } else if (c === 0x5d || c === 0x7d) depth--;
  }
  return deepest;
}

/**
 * The request's JSON body: 415 unless it is `application/json`, 413 beyond `maxBytes`, 400 when it is not UTF-8, nests
 * deeper than JSON_MAX_DEPTH or does not parse.
 */
export async function readJson(request: Request, options: { maxBytes?: number } = {}): Promise<unknown> {
  const type = mediaType(request);
  if (type !== "application/json")
    fail(415, `This address takes JSON (Content-Type: application/json), not ${type || "a body without a Content-Type"}.`);
  const body = await readBounded(request, options.maxBytes ?? JSON_MAX_BYTES);
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(body);
  } catch {
    return fail(400, "The body is not valid UTF-8.");
  }
  const depth = nestingDepth(text);
  if (depth > JSON_MAX_DEPTH) fail(400, `The body nests lists and objects ${depth} levels deep; at most ${JSON_MAX_DEPTH} are accepted.`);
  try {
    return JSON.parse(text);
  } catch (error) {
    return fail(400, `The body is not valid JSON: ${(error as Error).message}.`);
  }
}

/** A form field as a string: "" when missing, and the first value when the field is repeated; files are refused (400). */
export function formText(form: FormData, name: string): string {
  const value = form.get(name);
  if (value === null) return "";
  if (typeof value !== "string") fail(400, `The field “${name}” must be text, not a file.`);
  return value;
}

/**
 * A Content-Disposition header for a file name of any characters: an ASCII fallback (`filename`, quotes, slashes,
 * controls and non-ASCII replaced) and the exact name in `filename*` (RFC 6266 / RFC 8187), which headers can carry.
 */
export function contentDisposition(kind: "inline" | "attachment", filename: string): string {
  const fallback =
    filename
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .replace(/[^\x20-\x7e]|["\\/%;]/g, "_")
      .slice(0, 120)
      .trim() || "download";
  const exact = encodeURIComponent(filename.slice(0, 200)).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `${kind}; filename="${fallback}"; filename*=UTF-8''${exact}`;
}
