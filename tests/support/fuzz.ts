/**
 * A property-based fuzzer for form actions (and, later, API bodies), with fast-check.
 *
 * Every case starts from a body the target would accept and breaks it: one or more fields get a value of the
 * wrong type, a huge or negative or NaN number, a 100 kB string, control or bidirectional characters inside
 * unicode text, a file where text belongs, a second copy, or go missing; or the whole body is the wrong kind
 * (JSON, plain text, broken multipart, no Content-Type, too large). It is posted as a person with every right to
 * make the change, as a page would (document) or as the app's own scripts do (`.data`). Each case must be
 * answered with a 4xx that carries a message for the person, never a 500, and must leave the database exactly as
 * it was (`snapshot` in world.ts fingerprints every row the world owns).
 *
 * ADDING A FORM OR AN API BODY (phase 2): append a `FuzzTarget` to the list in tests/http/fuzz.test.ts:
 *
 *   {
 *     name: "project: upload-sprite",                 // shown in the test name
 *     path: (w) => `/projects/${w.project.id}`,        // where the form posts
 *     intent: "upload-sprite",                         // the form's intent (omit for forms without one)
 *     fields: {                                        // every field the action reads, with its kind (below)
 *       name: { kind: "name", valid: "emblem.png" },
 *       file: { kind: "file", valid: (w) => pngBytes },
 *     },
 *   }
 *
 * Kinds: "name" and "description" (the shared text rules), "uuid" (an id; also gets ids of things in another team
 * and of nothing), "version", "int" (with `min`/`max`), "enum" (with `values`), "file", "token", "json" (a value of
 * its own shape, such as an effect document or key pixels, with `wrong` listing values that must be refused; in a form
 * it is sent as JSON text). `maxBytes` on a target whose address reads more than the usual form limit (uploads) makes
 * the "body over the limit" case go past that address's own limit. Put `optional: true`
 * on a field the action may go without (it is then never "broken" by leaving it out), `firstWins: true` on one it
 * reads with formText (a repeat is then not sent). `body: "json"` makes the
 * target an API body: fields are sent as one JSON object (wrong types then include numbers as strings, objects,
 * arrays and null), and the answer must be JSON `{ error: { message } }`. `bodyOnly: true` fuzzes only the body's
 * kind (for forms whose fields cannot be wrong, such as sign-out). The world has one of everything (world.ts);
 * add what a new form needs there.
 */
import fc from "fast-check";
import { UNSAFE_decodeViaTurboStream as decodeViaTurboStream } from "react-router";
import type { World } from "./world.ts";

/**
 * `firstWins`: the action reads the field with formText, which takes the first of repeated values, so sending it
 * twice is not a mistake there (prefer parseForm, which refuses a repeat, and drop the flag).
 */
type Common = { optional?: boolean; firstWins?: boolean };
export type FieldSpec =
  | ({ kind: "name" | "description" | "token"; valid: string | ((w: World) => string) } & Common)
  | ({ kind: "uuid"; valid: (w: World) => string; foreign?: (w: World) => string } & Common)
  | ({ kind: "version"; valid: (w: World) => string } & Common)
  | ({ kind: "int"; valid: string | ((w: World) => string); min: number; max: number } & Common)
  | ({ kind: "enum"; valid: string; values: readonly string[] } & Common)
  | ({ kind: "file"; valid: (w: World) => Uint8Array } & Common)
  /** A JSON value of its own shape (an effect document): `wrong` lists values of the right type that must be refused. */
  | ({ kind: "json"; valid: (w: World) => unknown; wrong: (w: World) => unknown[] } & Common);

export interface FuzzTarget {
  name: string;
  path: (w: World) => string;
  intent?: string;
  fields?: Record<string, FieldSpec>;
  /** Only the body's kind is broken (the fields cannot be wrong). */
  bodyOnly?: boolean;
  /** An API body (JSON) rather than a form. */
  body?: "form" | "json";
  /** Who posts: the owner unless said. */
  as?: keyof World["as"];
  /** The most the address reads of a body, in bytes, where it is not the usual form limit (an address that takes uploads). */
  maxBytes?: number;
  /** The method (POST unless said; the API saves with PUT). */
  method?: "POST" | "PUT";
}

type Value = string | { file: Uint8Array; filename: string };
type Entries = [string, Value][];

export interface FuzzCase {
  mode: "document" | "data";
  broken: string;
  body:
    | { kind: "entries"; entries: Entries; multipart: boolean }
    | { kind: "raw"; contentType: string | null; bytes: Uint8Array | string }
    | { kind: "json"; value: unknown };
}

const KB100 = "é".repeat(50_000); // 100 kB of UTF-8
const CONTROLS = ["\u0000", "\u0007", "\u001b", "\u007f", "\u0085", "\u009b", "\t", "\n", "\r", "\u000b"];
const BIDI = ["\u202e", "\u202d", "\u2066", "\u2067", "\u2068", "\u2069", "\u200f", "\u061c"];
const text = (s: string): Value => s;
const uuidOfNothing = "00000000-0000-4000-8000-000000000000";

/** Unicode text with a character the shared text rule refuses, placed between two visible characters. */
function poisoned(refused: string[]): fc.Arbitrary<string> {
  return fc
    .tuple(
      fc.string({ unit: "grapheme", minLength: 0, maxLength: 30 }),
      fc.constantFrom(...refused),
      fc.string({ unit: "grapheme", maxLength: 30 }),
    )
    .map(([a, c, b]) => `x${a}${c}${b}y`);
}

/** Values a field of this kind must refuse (never a valid one: each arbitrary here is wrong by construction). */
function wrongValues(spec: FieldSpec, w: World): fc.Arbitrary<Value[] | null> {
  const one = (a: fc.Arbitrary<string>): fc.Arbitrary<Value[]> => a.map((v) => [text(v)]);
  const file: fc.Arbitrary<Value[]> = fc
    .constant(null)
    .map(() => [{ file: new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0, 1, 2]), filename: "x.bin" }]);
  const twice: fc.Arbitrary<Value[]> = fc.constant(null).map(() => {
    const valid = validValue(spec, w);
    return [valid, valid];
  });
  const common = spec.firstWins ? [file] : [file, twice];
  switch (spec.kind) {
    case "name":
      return fc.oneof(
        // Blank only where the name is required: an optional one left blank is made from elsewhere (a file's name).
        one(fc.constantFrom(...(spec.optional ? [] : ["", "   ", "\t\n "]), "x".repeat(81), KB100)),
        one(poisoned([...CONTROLS.filter((c) => c.trim() !== ""), "\t", "\n", ...BIDI])),
        ...common,
      );
    case "description":
      return fc.oneof(
        one(fc.constantFrom("x".repeat(2001), KB100)),
        one(poisoned(CONTROLS.filter((c) => !"\t\n\r".includes(c)))),
        ...common,
      );
    case "token":
      // Never "": a token field may be optional, and then empty is allowed.
      return fc.oneof(one(fc.constantFrom(KB100, "\u0000", "../../etc/passwd", "a b", "9lives")), ...common);
    case "uuid":
      return fc.oneof(
        one(
          fc.constantFrom(
            // "" only where the id is required: an optional choice (a select's "none") may be empty.
            ...(spec.optional ? [] : [""]),
            "not-a-uuid",
            "../../etc/passwd",
            uuidOfNothing,
            `${uuidOfNothing}\u0000`,
            KB100,
            "__proto__",
            "constructor",
          ),
        ),
        ...(spec.foreign ? [one(fc.constant(spec.foreign(w)))] : []),
        ...common,
      );
    case "version":
      return fc.oneof(
        // 2147483648: one past PostgreSQL's integer (the column a version is kept in).
        one(
          fc.constantFrom(
            "",
            "0",
            "-1",
            "1.5",
            "NaN",
            "Infinity",
            "-Infinity",
            "1e308",
            "99999999999999999999",
            "2147483648",
            "abc",
            "0x",
            KB100,
          ),
        ),
        // A version the thing is not at: someone else's change came first.
        one(
          fc
            .integer({ min: 1, max: 2_000_000_000 })
            .filter((v) => String(v) !== validValue(spec, w))
            .map(String),
        ),
        ...common,
      );
    case "int":
      return fc.oneof(
        // "" only where the number is required: an optional one left blank means none.
        one(fc.constantFrom(...(spec.optional ? [] : [""]), "NaN", "Infinity", "1e308", "-0.5", "1.5", "abc", "9".repeat(400), KB100)),
        one(fc.integer({ min: -1e9, max: spec.min - 1 }).map(String)),
        one(fc.integer({ min: spec.max + 1, max: 2e9 }).map(String)),
        ...common,
      );
    case "enum":
      return fc.oneof(
        // "" only where it is not one of the choices (a token's lifetime, say, takes "" for "until revoked").
        one(fc.constantFrom(...["", "__proto__", "constructor", "toString", KB100].filter((v) => !spec.values.includes(v)))),
        one(fc.string({ maxLength: 20 }).filter((v) => !spec.values.includes(v.trim()))),
        ...common,
      );
    case "file":
      return fc.oneof(one(fc.constantFrom("", "not a file", KB100)), twice);
    case "json":
      return one(fc.constantFrom(...spec.wrong(w).map((v) => JSON.stringify(v))));
  }
}

function validValue(spec: FieldSpec, w: World): Value {
  if (spec.kind === "file") return { file: spec.valid(w), filename: "sprite.png" };
  if (spec.kind === "json") return JSON.stringify(spec.valid(w));
  return typeof spec.valid === "function" ? spec.valid(w) : spec.valid;
}

/** A field's valid value as a JSON body carries it: numbers for versions and whole numbers, the value itself for JSON. */
function validJson(spec: FieldSpec, w: World): unknown {
  if (spec.kind === "json") return spec.valid(w);
  if (spec.kind === "file") throw new Error("a JSON body has no files");
  const v = typeof spec.valid === "function" ? spec.valid(w) : spec.valid;
  return spec.kind === "version" || spec.kind === "int" ? Number(v) : v;
}

/** The body a JSON target accepts. */
export function validJsonBody(target: FuzzTarget, w: World): Record<string, unknown> {
  return Object.fromEntries(Object.entries(target.fields ?? {}).map(([k, spec]) => [k, validJson(spec, w)]));
}

/** Values of the wrong JSON type for any field: what a careless client sends (numbers as strings, objects, arrays, null). */
const WRONG_TYPES: unknown[] = [null, true, {}, [], ["x"], { $gt: "" }, { __proto__: { admin: true } }];

/** JSON values a field of this kind must refuse (each wrong by construction). */
function wrongJson(spec: FieldSpec, w: World): fc.Arbitrary<unknown> {
  const types = fc.constantFrom(...WRONG_TYPES);
  switch (spec.kind) {
    case "name":
      return fc.oneof(
        fc.constantFrom("", "   ", "x".repeat(81), KB100, 42),
        poisoned([...CONTROLS.filter((c) => c.trim() !== ""), "\t", "\n", ...BIDI]),
        types,
      );
    case "description":
      return fc.oneof(fc.constantFrom("x".repeat(2001), KB100, 42), poisoned(CONTROLS.filter((c) => !"\t\n\r".includes(c))), types);
    case "token":
    case "uuid":
      return fc.oneof(fc.constantFrom("", "not-a-uuid", uuidOfNothing, KB100, "__proto__", 7), types);
    case "version": {
      const valid = Number(validValue(spec, w));
      return fc.oneof(
        fc.constantFrom(String(valid), 0, -1, 1.5, 1e308, 2 ** 31, -0, Number.MAX_SAFE_INTEGER + 2),
        fc.integer({ min: 1, max: 2_000_000_000 }).filter((v) => v !== valid),
        types,
      );
    }
    case "int":
      return fc.oneof(
        // The valid number as a string: a JSON body carries numbers as numbers.
        fc.constantFrom(String(validValue(spec, w)), 1.5, 1e308, -0.5),
        fc.integer({ min: -1e9, max: spec.min - 1 }),
        fc.integer({ min: spec.max + 1, max: 2e9 }),
        types,
      );
    case "enum":
      return fc.oneof(
        fc.constantFrom(
          ...["", "__proto__", "constructor", "toString", KB100, spec.valid.toUpperCase()].filter((v) => !spec.values.includes(v)),
          8,
        ),
        fc.string({ maxLength: 20 }).filter((v) => !spec.values.includes(v)),
        types,
      );
    case "file":
      return types;
    case "json":
      // Only the target's own list: null, a number or a list may be a valid choice of some field (a lifetime of null).
      return fc.constantFrom(...spec.wrong(w));
  }
}

/** Cases for a JSON target: broken fields, unknown fields, a body that is not an object, or not JSON at all. */
function jsonCases(target: FuzzTarget, w: World): fc.Arbitrary<FuzzCase> {
  const valid = validJsonBody(target, w);
  const text = JSON.stringify(valid);
  const urlencoded = new URLSearchParams(Object.entries(valid).map(([k, v]) => [k, String(v)])).toString();
  const raw = (contentType: string | null, bytes: Uint8Array | string): FuzzCase["body"] => ({ kind: "raw", contentType, bytes });
  const wrongBody = fc.constantFrom<[string, FuzzCase["body"]]>(
    ["a form body", raw("application/x-www-form-urlencoded", urlencoded)],
    ["plain text", raw("text/plain", text)],
    ["no Content-Type", raw(null, text)],
    ["JSON cut short", raw("application/json", text.slice(0, Math.max(1, text.length - 3)))],
    ["JSON with a trailing comma", raw("application/json", `${text.slice(0, -1)},}`)],
    ["two JSON values", raw("application/json", `${text}${text}`)],
    ["a body over the JSON limit", raw("application/json", JSON.stringify({ ...valid, pad: "x".repeat(1100 * 1024) }))],
    ["a body that is not UTF-8", raw("application/json", new Uint8Array([0x7b, 0x22, 0xff, 0xfe, 0x22, 0x3a, 0x31, 0x7d]))],
    ["JSON nested 100000 deep", raw("application/json", `${"[".repeat(100_000)}${"]".repeat(100_000)}`)],
    ["an empty body", raw("application/json", "")],
  );
  const bodyCases = wrongBody.map(([broken, body]) => ({ mode: "document", broken, body }) as FuzzCase);
  const notObject = fc
    .constantFrom<unknown>(null, 42, "text", [], [valid], true)
    .map(
      (value) =>
        ({ mode: "document", broken: `the body ${JSON.stringify(value).slice(0, 40)}`, body: { kind: "json", value } }) as FuzzCase,
    );
  const fields = Object.entries(target.fields ?? {});
  const fieldCase = fc
    .tuple(
      fc.subarray(fields, { minLength: 1 }),
      fc.option(fc.constantFrom("extra", "__proto__", "constructor", "Version"), { nil: undefined }),
    )
    .chain(([broken, extra]) =>
      fc
        .tuple(
          ...broken.map(([, spec]) =>
            fc.oneof(
              { weight: 6, arbitrary: wrongJson(spec, w).map((v) => ({ v })) },
              { weight: spec.optional ? 0 : 1, arbitrary: fc.constant(null) }, // missing
            ),
          ),
        )
        .map((values) => {
          const body: Record<string, unknown> = { ...valid };
          broken.forEach(([name], i) => {
            const v = values[i];
            if (v === null) delete body[name];
            else body[name] = v.v;
          });
          // An unknown field is its own mistake (a strict body refuses it), even when nothing else is wrong.
          let json = JSON.stringify(body);
          if (extra) json = `${json.slice(0, -1)}${json.length > 2 ? "," : ""}${JSON.stringify(extra)}:1}`;
          const describe = broken
            .map(([name], i) => {
              const v = values[i];
              if (v === null) return `${name} missing`;
              const shown = JSON.stringify(v.v) ?? String(v.v);
              return `${name}=${shown.length > 40 ? `${shown.slice(0, 40)}…(${shown.length})` : shown}`;
            })
            .join(", ");
          return {
            mode: "document",
            broken: extra ? `${describe}, and a field ${JSON.stringify(extra)}` : describe,
            body: { kind: "raw", contentType: "application/json", bytes: json },
          } as FuzzCase;
        }),
    );
  return fc.oneof({ weight: 5, arbitrary: fieldCase }, { weight: 1, arbitrary: notObject }, { weight: 2, arbitrary: bodyCases });
}

/** The body the target accepts, as form entries. */
export function validEntries(target: FuzzTarget, w: World): Entries {
  const entries: Entries = target.intent ? [["intent", target.intent]] : [];
  for (const [name, spec] of Object.entries(target.fields ?? {})) entries.push([name, validValue(spec, w)]);
  return entries;
}

const encoder = new TextEncoder();

/** Cases for one target: broken fields, broken intents, or a body of the wrong kind. */
export function fuzzCases(target: FuzzTarget, w: World): fc.Arbitrary<FuzzCase> {
  if (target.body === "json") return jsonCases(target, w);
  const mode = fc.constantFrom<FuzzCase["mode"]>("document", "data");
  const valid = validEntries(target, w);
  const asJson = JSON.stringify(Object.fromEntries(valid.map(([k, v]) => [k, typeof v === "string" ? v : "<file>"])));
  const urlencoded = new URLSearchParams(valid.filter(([, v]) => typeof v === "string") as [string, string][]).toString();
  const wrongBody = fc.constantFrom<[string, FuzzCase["body"]]>(
    ["a JSON body", { kind: "raw", contentType: "application/json", bytes: asJson }],
    ["plain text", { kind: "raw", contentType: "text/plain", bytes: urlencoded }],
    ["no Content-Type", { kind: "raw", contentType: null, bytes: urlencoded }],
    [
      "broken multipart",
      {
        kind: "raw",
        contentType: "multipart/form-data; boundary=xyz",
        bytes: `--xyz\r\nContent-Disposition: form-data; name="intent"\r\n\r\n${target.intent ?? ""}`,
      },
    ],
    ["multipart without a boundary", { kind: "raw", contentType: "multipart/form-data", bytes: urlencoded }],
    ["an XML body", { kind: "raw", contentType: "application/xml", bytes: "<intent>x</intent>" }],
    [
      "a body over the form limit",
      {
        kind: "raw",
        contentType: "application/x-www-form-urlencoded",
        bytes: `${urlencoded}&pad=${"x".repeat(Math.max(300 * 1024, (target.maxBytes ?? 0) + 1024))}`,
      },
    ],
    ["a body that is not UTF-8", { kind: "raw", contentType: "application/json; charset=utf-16", bytes: encoder.encode("\u00ff\u00fe{") }],
  );
  const bodyCases = fc.tuple(mode, wrongBody).map(([m, [broken, body]]) => ({ mode: m, broken, body }) as FuzzCase);
  if (target.bodyOnly || !target.fields) {
    if (!target.intent) return bodyCases;
    const wrongIntent = fc
      .tuple(mode, fc.constantFrom("", "bogus", "__proto__", "constructor", "hasOwnProperty", KB100, "create-team\u0000"), fc.boolean())
      .map(
        ([m, intent, missing]) =>
          ({
            mode: m,
            broken: missing ? "no intent" : `intent ${JSON.stringify(intent.slice(0, 20))}`,
            body: {
              kind: "entries",
              entries: missing ? valid.filter(([k]) => k !== "intent") : valid.map(([k, v]) => [k, k === "intent" ? intent : v]),
              multipart: false,
            },
          }) as FuzzCase,
      );
    return fc.oneof(bodyCases, wrongIntent);
  }
  const fields = Object.entries(target.fields);
  const fieldCase = fc
    .tuple(
      mode,
      fc.subarray(fields, { minLength: 1 }),
      fc.boolean(),
      fc.array(fc.constantFrom(...fields.map(([k]) => k)), { maxLength: 2 }),
    )
    .chain(([m, broken, multipart, shuffle]) =>
      fc
        .tuple(
          ...broken.map(([, spec]) =>
            fc.oneof(
              { weight: 6, arbitrary: wrongValues(spec, w) },
              { weight: spec.optional ? 0 : 1, arbitrary: fc.constant(null) }, // missing
            ),
          ),
        )
        .map((values) => {
          const replaced = new Map(broken.map(([name], i) => [name, values[i]]));
          const entries: Entries = [];
          for (const [k, v] of valid) {
            if (!replaced.has(k)) entries.push([k, v]);
            else for (const x of replaced.get(k) ?? []) entries.push([k, x]);
          }
          // Order must not matter: move a few fields to the end.
          for (const k of shuffle) {
            const at = entries.findIndex(([name]) => name === k);
            if (at >= 0) entries.push(...entries.splice(at, 1));
          }
          const hasFile = entries.some(([, v]) => typeof v !== "string");
          const describe = broken
            .map(([name], i) => {
              const v = values[i];
              if (v === null) return `${name} missing`;
              if (v.length > 1) return `${name} twice`;
              const x = v[0];
              return typeof x === "string"
                ? `${name}=${JSON.stringify(x.length > 24 ? `${x.slice(0, 24)}…(${x.length})` : x)}`
                : `${name} as a file`;
            })
            .join(", ");
          return { mode: m, broken: describe, body: { kind: "entries", entries, multipart: multipart || hasFile } } as FuzzCase;
        }),
    );
  return fc.oneof({ weight: 4, arbitrary: fieldCase }, { weight: 1, arbitrary: bodyCases });
}

/** The case as a fetch body and headers. */
export function encodeCase(c: FuzzCase): { body: BodyInit; headers: Record<string, string> } {
  if (c.body.kind === "json") return { body: JSON.stringify(c.body.value), headers: { "Content-Type": "application/json" } };
  if (c.body.kind === "raw")
    return { body: c.body.bytes as BodyInit, headers: c.body.contentType ? { "Content-Type": c.body.contentType } : {} };
  if (!c.body.multipart) {
    const params = new URLSearchParams();
    for (const [k, v] of c.body.entries) if (typeof v === "string") params.append(k, v);
    return { body: params.toString(), headers: { "Content-Type": "application/x-www-form-urlencoded" } };
  }
  const form = new FormData();
  for (const [k, v] of c.body.entries)
    if (typeof v === "string") form.append(k, v);
    else form.append(k, new Blob([v.file as Uint8Array<ArrayBuffer>]), v.filename);
  return { body: form, headers: {} };
}

/** The message an answer carries for the person, if any: from the data, the error page, or a field message. */
export async function messageOf(response: Response, mode: FuzzCase["mode"]): Promise<string | null> {
  const type = response.headers.get("Content-Type") ?? "";
  if (type.includes("application/json")) {
    const body = (await response.json()) as { error?: { message?: unknown } };
    return typeof body.error?.message === "string" ? body.error.message : null;
  }
  if (mode === "data" && type.includes("text/x-script")) {
    const decoded = await decodeViaTurboStream(response.body!, globalThis);
    await decoded.done;
    return findMessage(decoded.value);
  }
  const html = await response.text();
  const messages = [...html.matchAll(/(?:role="alert"|data-testid="error-message")[^>]*>([^<]+)</g)]
    .map((m) => m[1].trim())
    .filter(Boolean);
  if (messages.length > 0) return messages.join(" | ");
  // A refusal made before any page (the origin check, say) is a small page of its own.
  const refusal = /<h1>This request was refused<\/h1><p>([^<]+)</.exec(html);
  if (refusal) return refusal[1];
  // The page carries the action's answer in its hydration data even where no field shows it (a hidden field
  // tampered with, say): decode that, as the browser does.
  return findMessage(await hydrationData(html));
}

/** The data a server-rendered page hands to the browser (the framework's turbo-stream chunks in its scripts). */
export async function hydrationData(html: string): Promise<unknown> {
  const chunks = [...html.matchAll(/streamController\.enqueue\(("(?:[^"\\]|\\.)*")\);/g)].map((m) => JSON.parse(m[1]) as string);
  if (chunks.length === 0) return null;
  const bytes = new TextEncoder().encode(chunks.join(""));
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(bytes);
      controller.close();
    },
  });
  const decoded = await decodeViaTurboStream(stream, globalThis);
  await decoded.done.catch(() => {});
  return decoded.value;
}

function findMessage(value: unknown, depth = 0): string | null {
  if (depth > 8 || value === null || typeof value !== "object") return null;
  const v = value as Record<string, unknown>;
  // An error response of the framework's own (a method a route does not take): its data is the explanation.
  if (typeof v.status === "number" && typeof v.data === "string" && v.data.length > 0) return v.data;
  if (v.errors && typeof v.errors === "object") {
    const first = Object.values(v.errors as Record<string, unknown>).find((m) => typeof m === "string" && m.length > 0);
    if (typeof first === "string") return first;
  }
  if (typeof v.message === "string" && v.message.length > 0) return v.message;
  for (const inner of Object.values(v)) {
    const found = findMessage(inner, depth + 1);
    if (found) return found;
  }
  return null;
}
