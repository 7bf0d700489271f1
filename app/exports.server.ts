/**
 * Export bundles served by the app: one saved effect, or every live effect of a project. The bytes come from core's
 * exportBundle over the stored document (validated again by core); this module only reads the options from a query
 * string, fills in the target profile's defaults, names the result with an ETag, and packs a project's bundles into
 * one zip. The session routes (`/effects/:id/export.zip`, `/projects/:id/export.zip`) and the JSON API share it.
 */
import { createHash } from "node:crypto";
import {
  ExportOptionError,
  REGISTER_BITS,
  checkLabel,
  EXPORT_MAX_BYTES,
  exportBudget,
  exportBundle,
  resolveExportOptions,
  type Effect,
  type ExportBundle,
  type ExportOptions,
  type ExportOptionsInput,
  type ExportOutput,
} from "@skewsmith/core";
import canonicalize from "canonicalize";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { zipSync, type Zippable } from "fflate";
import type { Tx } from "./db/client.server.ts";
import { effects, targetProfiles, type EffectRow, type Project } from "./db/schema.ts";
import { exportDefaultsForProfile } from "./exports/defaults.ts";
import type { ProfileExportSettings } from "./profiles/apply.ts";
import { validDocument } from "./models/effects.server.ts";
import { DomainError } from "./models/errors.ts";

/** The query parameters an export takes, named as core names the options. Any other parameter is ignored. */
export const EXPORT_QUERY_PARAMETERS = ["outputs", "label", "sign", "registerBits", "element", "split", "half", "dedupe"] as const;
export type ExportQueryParameter = (typeof EXPORT_QUERY_PARAMETERS)[number];

/** What a query may give for split, half and dedupe; an empty value (`?split`) means on. */
const FLAG_WORDS: Readonly<Record<string, boolean>> = { "": true, true: true, "1": true, false: false, "0": false };

/** The options a query string sets: only the parameters present, each checked with core's own rule and message. */
export type ExportQuery = { -readonly [K in keyof ExportOptionsInput]?: ExportOptionsInput[K] };

function badParameter(error: ExportOptionError, parameter: ExportQueryParameter): never {
  throw new DomainError(error.message, { field: parameter, status: 400 });
}

/**
 * Reads the export options from query parameters. A bad value is a 400 DomainError naming the parameter and the allowed
 * values (core's ExportOptionError message); a parameter given twice with different values is refused too. Parameters
 * are looked up by name from a fixed list, so nothing a caller sends becomes a key of any object.
 */
export function exportQuery(params: URLSearchParams): ExportQuery {
  const query: ExportQuery = {};
  for (const parameter of EXPORT_QUERY_PARAMETERS) {
    const values = params.getAll(parameter);
    if (values.length === 0) continue;
    if (parameter === "outputs") {
      // Repeated `outputs` add up, so `?outputs=c&outputs=6502` is the same as `?outputs=c,6502`.
      const words = values.flatMap((v) => v.split(",")).map((w) => w.trim());
      const outputs = words.filter((w) => w !== "");
      try {
        query.outputs = resolveExportOptions({ outputs: outputs as ExportOutput[] }).outputs;
      } catch (error) {
        if (error instanceof ExportOptionError) badParameter(error, parameter);
        throw error;
      }
      continue;
    }
    if (new Set(values).size > 1)
      throw new DomainError(`${parameter}: given ${values.length} times with different values; give it once`, {
        field: parameter,
        status: 400,
      });
    const text = values[0];
    try {
      switch (parameter) {
        case "label":
          query.label = checkLabel(text);
          break;
        case "sign":
          query.sign = resolveExportOptions({ sign: text as ExportOptionsInput["sign"] }).sign;
          break;
        case "element":
          query.element = resolveExportOptions({ element: text as ExportOptionsInput["element"] }).element;
          break;
        case "registerBits":
          if (text === "" || text === "none") query.registerBits = null;
          else if (/^\d{1,3}$/.test(text)) query.registerBits = resolveExportOptions({ registerBits: Number(text) }).registerBits;
          else
            throw new ExportOptionError(
              "registerBits",
              text,
              `a whole number from ${REGISTER_BITS.min} to ${REGISTER_BITS.max}, or none (plain signed values)`,
            );
          break;
        case "split":
        case "half":
        case "dedupe": {
          const on = Object.hasOwn(FLAG_WORDS, text) ? FLAG_WORDS[text] : undefined;
          if (on === undefined) throw new ExportOptionError(parameter, text, "true or false (also 1 or 0; empty means true)");
          query[parameter] = on;
          break;
        }
      }
    } catch (error) {
      if (error instanceof ExportOptionError) badParameter(error, parameter);
      throw error;
    }
  }
  return query;
}

export type { ProfileExportSettings } from "./profiles/apply.ts";

/** One effect to export: its stored row and the profile it uses (if any). */
export interface ExportSource {
  /** The stored document is validated again by core before anything is built from it. */
  readonly effect: { readonly id: string; readonly name: string; readonly document: unknown };
  readonly profile: ProfileExportSettings | null;
}

/** A planned export: what will be built and the inputs its ETag stands for; nothing is compiled yet. */
export interface ExportPlan {
  readonly etag: string;
  /** The file name the download is offered under. */
  readonly fileName: string;
  readonly build: () => Uint8Array;
}

/** Validated document and resolved options of one effect: everything its bundle depends on. */
interface EffectInputs {
  readonly document: Effect;
  readonly input: ExportOptionsInput;
  readonly options: ExportOptions;
}

function effectInputs(source: ExportSource, query: ExportQuery, labelOverride?: string): EffectInputs {
  const document = validDocument(source.effect.document);
  const input: ExportOptionsInput = {
    // The profile's label prefix, dialects and options (app/exports/defaults.ts), or core's defaults without one.
    ...exportDefaultsForProfile(source.profile, source.effect.name),
    ...query,
    ...(labelOverride !== undefined && { label: labelOverride }),
    name: source.effect.name,
  };
  try {
    return { document, input, options: resolveExportOptions(input) };
  } catch (error) {
    if (error instanceof ExportOptionError) throw optionProblem(error, source.effect.name);
    throw error;
  }
}

function optionProblem(error: ExportOptionError, effectName: string): DomainError {
  const field = (EXPORT_QUERY_PARAMETERS as readonly string[]).includes(error.field) ? error.field : undefined;
  return new DomainError(`${effectName}: ${error.message}`, { field, status: 400 });
}

/** Builds one effect's bundle; a bad option for this effect or tables over the limit become a 400 naming the effect. */
function buildBundle(name: string, inputs: EffectInputs): ExportBundle {
  try {
    return exportBundle(inputs.document, inputs.input);
  } catch (error) {
    if (error instanceof ExportOptionError) throw optionProblem(error, name);
    if (error instanceof RangeError) throw new DomainError(`${name}: ${error.message}`, { status: 400 });
    throw error;
  }
}

/** Revision of the ETag inputs below; bump it when their meaning changes. */
const ETAG_REVISION = "skewsmith.export-etag/1";

let exporterPrint: string | undefined;
/**
 * A fingerprint of the exporters in this server: the hash of the bundle core makes for a small fixed effect. A new core
 * whose output differs gives every ETag a new value, so a build never keeps files an older server made.
 */
function exporterFingerprint(): string {
  exporterPrint ??= sha256(
    exportBundle(validDocument({ canvas: { width: 8, height: 6 }, pivot: { x: 4, y: 3 }, angles: { list: [0, 30, 135, 180, 270] } }), {
      name: "fingerprint",
    }).zip,
  );
  return exporterPrint;
}

function sha256(data: string | Uint8Array): string {
  return createHash("sha256").update(data).digest("base64url");
}

/** A strong ETag over the canonical JSON (RFC 8785) of what a bundle is made from. */
function etagOf(inputs: unknown): string {
  const text = canonicalize({ revision: ETAG_REVISION, exporter: exporterFingerprint(), inputs });
  if (text === undefined) throw new Error("export ETag inputs did not serialise");
  return `"${sha256(text).slice(0, 32)}"`;
}

/** Plans the export of one saved effect with the query's options over its profile's defaults. */
export function planEffectExport(source: ExportSource, query: ExportQuery): ExportPlan {
  const inputs = effectInputs(source, query);
  return {
    etag: etagOf({ kind: "effect", document: inputs.document, options: inputs.options }),
    fileName: `${inputs.options.label}.zip`,
    build: () => buildBundle(source.effect.name, inputs).zip,
  };
}

/** Date stamped on every entry of a project zip: the earliest a zip (DOS) date holds, as core stamps effect bundles. */
const ZIP_DATE = new Date(1980, 0, 1, 0, 0, 0);

/** A label made unique among `taken` by a numeric suffix that still fits core's length limit. */
function uniqueLabel(label: string, taken: Set<string>): string {
  if (!taken.has(label.toLowerCase())) return label;
  for (let n = 2; ; n++) {
    const suffix = `_${n}`;
    const candidate = `${label.slice(0, 23 - suffix.length).replace(/_+$/, "")}${suffix}`;
    if (!taken.has(candidate.toLowerCase())) return checkLabel(candidate);
  }
}

/** A file-name stem from a project name: lower-case ASCII letters, digits and dashes. */
function slug(name: string): string {
  return (
    name
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 60)
      .replace(/-+$/, "") || "project"
  );
}

function projectReadme(projectName: string, rows: { name: string; label: string; renamed: boolean; frames: number }[]): string {
  const lines = [
    `Skewsmith export bundle of the project ${JSON.stringify(projectName)}`,
    "",
    rows.length === 0
      ? "The project has no effects yet, so this bundle holds no tables."
      : `One folder per effect, named after its label prefix; each holds that effect's own bundle and README.txt.`,
    "",
  ];
  const width = Math.max(6, ...rows.map((r) => r.label.length));
  for (const r of rows) lines.push(`  ${`${r.label}/`.padEnd(width + 2)}${r.name} (${r.frames} frames)`);
  const renamed = rows.filter((r) => r.renamed);
  if (renamed.length > 0)
    lines.push(
      "",
      `Effects whose labels would repeat got a numeric suffix (${renamed.map((r) => r.label).join(", ")}), so every symbol stays`,
      "unique when the effects are linked together. Give those effects labels of their own to choose the names.",
    );
  return `${lines.join("\n")}\n`;
}

/**
 * Most bytes of tables a project zip may hold over all its effects: twice what one effect's bundle may (core's
 * EXPORT_MAX_BYTES, 32 MiB), so one request's work and memory stay bounded however many effects a project has.
 */
export const PROJECT_EXPORT_MAX_BYTES = 2 * EXPORT_MAX_BYTES;

/** Refuses a project export whose tables add up to more than PROJECT_EXPORT_MAX_BYTES, before any bundle is built. */
function checkProjectBudget(planned: readonly { source: ExportSource; inputs: EffectInputs }[]): void {
  let total = 0;
  for (const p of planned) {
    try {
      total += exportBudget(p.inputs.document, p.inputs.input).totalBytes;
    } catch (error) {
      if (error instanceof ExportOptionError) throw optionProblem(error, p.source.effect.name);
      throw error;
    }
    if (total > PROJECT_EXPORT_MAX_BYTES)
      throw new DomainError(
        `The project's tables come to more than ${PROJECT_EXPORT_MAX_BYTES} bytes (64 MiB) by ${p.source.effect.name}; a project zip holds at most that. Export the biggest effects on their own, or use dedupe or half tables.`,
        { status: 400 },
      );
  }
}

/**
 * Plans the export of a project: every live effect's bundle (each with its own profile's defaults and the query's
 * options) in a folder named after its label, labels made unique across the project, and a README listing them.
 */
export function planProjectExport(project: Pick<Project, "name">, sources: readonly ExportSource[], query: ExportQuery): ExportPlan {
  const taken = new Set<string>();
  const planned = sources.map((source) => {
    const first = effectInputs(source, query);
    const label = uniqueLabel(first.options.label, taken);
    taken.add(label.toLowerCase());
    const inputs = label === first.options.label ? first : effectInputs(source, query, label);
    return { source, inputs, renamed: label !== first.options.label };
  });
  return {
    etag: etagOf({
      kind: "project",
      name: project.name,
      effects: planned.map((p) => ({ document: p.inputs.document, options: p.inputs.options })),
    }),
    fileName: `${slug(project.name)}.zip`,
    build: () => {
      checkProjectBudget(planned);
      const enc = new TextEncoder();
      const entries: Zippable = {};
      const rows = [];
      for (const p of planned) {
        const bundle = buildBundle(p.source.effect.name, p.inputs);
        for (const f of bundle.files) entries[`${bundle.label}/${f.name}`] = [f.bytes, { mtime: ZIP_DATE }];
        rows.push({ name: p.source.effect.name, label: bundle.label, renamed: p.renamed, frames: bundle.budget.frames });
      }
      const readme = enc.encode(projectReadme(project.name, rows));
      return zipSync({ "README.txt": [readme, { mtime: ZIP_DATE }], ...entries }, { level: 6, mtime: ZIP_DATE });
    },
  };
}

/** The live effects of a project with their profiles, by name (the project page's order), ready to plan an export. */
export async function projectExportSources(db: Tx, project: Pick<Project, "id" | "teamId">): Promise<ExportSource[]> {
  const [rows, profiles] = await Promise.all([
    db
      .select({ id: effects.id, name: effects.name, document: effects.document, targetProfileId: effects.targetProfileId })
      .from(effects)
      .where(and(eq(effects.projectId, project.id), isNull(effects.deletedAt)))
      .orderBy(asc(sql`lower(${effects.name})`), asc(effects.id)),
    db.select().from(targetProfiles).where(eq(targetProfiles.teamId, project.teamId)),
  ]);
  const byId = new Map(profiles.map((p) => [p.id, p]));
  return rows.map((effect) => ({ effect, profile: effect.targetProfileId ? (byId.get(effect.targetProfileId) ?? null) : null }));
}

/** An effect's export source: the effect and its profile, if it uses one. */
export async function effectExportSource(
  db: Tx,
  effect: Pick<EffectRow, "id" | "name" | "document" | "targetProfileId">,
): Promise<ExportSource> {
  if (!effect.targetProfileId) return { effect, profile: null };
  const [profile] = await db.select().from(targetProfiles).where(eq(targetProfiles.id, effect.targetProfileId));
  return { effect, profile: profile ?? null };
}

/** True when an If-None-Match header names `etag` (weak comparison, as RFC 9110 §13.1.2 asks for GET), or is `*`. */
export function etagMatches(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  const wanted = etag.replace(/^W\//, "");
  return ifNoneMatch
    .split(",")
    .map((t) => t.trim())
    .some((t) => t === "*" || t.replace(/^W\//, "") === wanted);
}

/**
 * The download for a plan: 304 when the request's If-None-Match already names the bundle (nothing is built), else the
 * zip with its ETag. Browsers and build tools revalidate every time (`no-cache`), and only the signed-in person's
 * caches may keep it (`private`).
 */
export function exportResponse(request: Request, plan: ExportPlan): Response {
  const headers = new Headers({ ETag: plan.etag, "Cache-Control": "private, no-cache", Vary: "Authorization, Cookie" });
  if (etagMatches(request.headers.get("If-None-Match"), plan.etag)) return new Response(null, { status: 304, headers });
  const zip = plan.build();
  headers.set("Content-Type", "application/zip");
  headers.set("Content-Disposition", `attachment; filename="${plan.fileName}"`);
  headers.set("Content-Length", String(zip.byteLength));
  // RFC 9530: lets a client (skewsmith pull) check that the bytes arrived whole.
  headers.set("Content-Digest", `sha-256=:${createHash("sha256").update(zip).digest("base64")}:`);
  return new Response(new Uint8Array(zip.buffer as ArrayBuffer, zip.byteOffset, zip.byteLength), { status: 200, headers });
}
