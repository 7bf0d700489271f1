import { createHash } from "node:crypto";
import { parseArgs } from "node:util";
import { resolveExportOptions, type ExportOptionsInput } from "../export/options.ts";
import { exportArgOptions, exportOptionsFromArgs, exportOptionsHelp, withOptionErrors } from "./export.ts";
import { UsageError, type Command } from "./io.ts";
import { folderIntact, PullError, readPullState, replaceFolder, unpackBundle } from "./pullFolder.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Largest answer a pull reads, in bytes: 256 MiB, well above any bundle the server makes. */
export const PULL_MAX_DOWNLOAD_BYTES = 256 * 1024 * 1024;
/** How long a pull waits for the whole answer by default, in seconds. */
export const PULL_TIMEOUT_SECONDS = 120;

const FLAGS = ["split", "half", "dedupe"] as const;

const pullArgOptions = {
  ...exportArgOptions,
  server: { type: "string" },
  token: { type: "string" },
  effect: { type: "string" },
  project: { type: "string" },
  out: { type: "string" },
  force: { type: "boolean" },
  timeout: { type: "string" },
  "no-split": { type: "boolean" },
  "no-half": { type: "boolean" },
  "no-dedupe": { type: "boolean" },
} as const;

/** One line, however the server or the system worded it. */
const oneLine = (text: string, max = 300) => {
  const line = text.replace(/\s+/g, " ").trim();
  return line.length > max ? `${line.slice(0, max - 1)}…` : line;
};

/** The export options given on the command line (only those given: the rest are the server's defaults), as query parameters. */
function exportQuery(values: Record<string, string | boolean | undefined>): URLSearchParams {
  const parsed = exportOptionsFromArgs(values, "pull");
  const given: ExportOptionsInput = {
    ...(values.label !== undefined && { label: parsed.label }),
    ...(values.outputs !== undefined && { outputs: parsed.outputs }),
    ...(values.sign !== undefined && { sign: parsed.sign }),
    ...(values["register-bits"] !== undefined && { registerBits: parsed.registerBits }),
    ...(values.element !== undefined && { element: parsed.element }),
  };
  // Checked here with core's own rules, so a mistyped option fails before anything is sent.
  withOptionErrors(() => resolveExportOptions(given));
  const query = new URLSearchParams();
  if (given.outputs) query.set("outputs", given.outputs.join(","));
  if (given.label !== undefined) query.set("label", given.label);
  if (given.sign !== undefined) query.set("sign", given.sign);
  if (given.registerBits !== undefined && given.registerBits !== null) query.set("registerBits", String(given.registerBits));
  if (given.element !== undefined) query.set("element", given.element);
  for (const flag of FLAGS) {
    const on = values[flag] === true;
    const off = values[`no-${flag}`] === true;
    if (on && off) throw new UsageError(`--${flag} and --no-${flag} contradict each other; give one`);
    if (on || off) query.set(flag, on ? "true" : "false");
  }
  return query;
}

function serverBase(text: string | undefined): URL {
  if (!text) throw new UsageError("--server URL is required (the Skewsmith address, say https://skewsmith.example), or set SKEWSMITH_URL");
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    throw new UsageError(`--server: ${JSON.stringify(text)} is not a URL; allowed an http:// or https:// address`);
  }
  if (url.protocol !== "http:" && url.protocol !== "https:")
    throw new UsageError(`--server: ${JSON.stringify(text)} is not allowed; allowed an http:// or https:// address`);
  if (url.username || url.password) throw new UsageError("--server: put the token in --token or SKEWSMITH_TOKEN, not in the address");
  url.search = "";
  url.hash = "";
  if (!url.pathname.endsWith("/")) url.pathname += "/";
  return url;
}

/** Why fetch could not get an answer, in words: the system's error code when there is one. */
function networkReason(error: unknown, server: string, timeout: number): string {
  const e = error as { name?: string; cause?: { code?: string; message?: string }; message?: string };
  if (e?.name === "TimeoutError" || e?.name === "AbortError") return `no answer from ${server} within ${timeout} s`;
  const code = e?.cause?.code;
  const why: Record<string, string> = {
    ECONNREFUSED: "connection refused (is the server running, on that port?)",
    ENOTFOUND: "no such host",
    EAI_AGAIN: "the host name could not be looked up",
    ECONNRESET: "the connection was reset",
    EHOSTUNREACH: "the host cannot be reached",
    ETIMEDOUT: "the connection timed out",
    UND_ERR_SOCKET: "the connection closed before the answer was complete",
  };
  const reason = (code && why[code]) ?? oneLine(e?.cause?.message ?? e?.message ?? String(error), 160);
  return `cannot reach ${server}: ${reason}`;
}

/** The message of an error answer: the API's `{"error": {"message"}}`, or the first words of whatever else came. */
async function answerMessage(response: Response): Promise<string> {
  const text = await response.text().catch(() => "");
  try {
    const message = (JSON.parse(text) as { error?: { message?: unknown } }).error?.message;
    if (typeof message === "string") return oneLine(message);
  } catch {
    // Not the API's JSON (a proxy's page, say): fall through to the raw text.
  }
  return oneLine(text.replace(/<[^>]*>/g, " "), 160) || response.statusText || "no explanation given";
}

async function readBody(response: Response, limit: number): Promise<Uint8Array> {
  const declared = Number(response.headers.get("Content-Length") ?? "NaN");
  if (Number.isFinite(declared) && declared > limit)
    throw new PullError(`the bundle is ${declared} bytes, more than the ${limit} a pull accepts`);
  if (!response.body) return new Uint8Array(0);
  const reader = response.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      await reader.cancel().catch(() => {});
      throw new PullError(`the bundle is more than the ${limit} bytes a pull accepts`);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(size);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  if (Number.isFinite(declared) && declared !== size) throw new PullError(`the download stopped after ${size} of ${declared} bytes`);
  return out;
}

/** Checks a `Content-Digest: sha-256=:…:` header (RFC 9530) when the server sends one. */
function checkDigest(response: Response, body: Uint8Array): void {
  const header = response.headers.get("Content-Digest");
  const match = header ? /(?:^|,)\s*sha-256=:([A-Za-z0-9+/=]+):/.exec(header) : null;
  if (!match) return;
  const actual = createHash("sha256").update(body).digest("base64");
  if (actual !== match[1]) throw new PullError("the download is damaged: its SHA-256 differs from the Content-Digest the server sent");
}

/** `skewsmith pull`: downloads a saved effect's (or a project's) export bundle from a server and unpacks it into a folder. */
export const pullCommand: Command = {
  summary: "download an effect's or a project's export bundle from a Skewsmith server into a folder",
  help: `usage: skewsmith pull --server URL (--effect ID | --project ID) --out DIR [options]

Downloads the export bundle of a saved effect, or of every effect of a project (one
folder per effect), from a Skewsmith server and unpacks it into DIR, for a build
to use. The bundle is unpacked into a temporary folder beside DIR and put in DIR's
place only when complete, so DIR always holds one whole bundle. DIR must be new,
empty or made by an earlier pull. The ETag of the bundle is kept in
DIR/.skewsmith-pull.json: when nothing changed on the server since, nothing is
downloaded ("up to date") and DIR is left alone.

Exits 0 when DIR holds the current bundle, 1 when the pull failed (the server
refused the token or the id, could not be reached, or sent something that is not
a whole zip), 2 for a mistake in the options. DIR is unchanged after a failure.

options:
  --server URL          the Skewsmith address (default: $SKEWSMITH_URL)
  --token TOKEN         an API token from your settings page; read scope is enough
                        (default: $SKEWSMITH_TOKEN, which keeps it out of the process
                        list and the shell history)
  --effect ID           the effect to pull (its id, from the API or its address)
  --project ID          or the project: every live effect in it
  --out DIR             the folder to fill
  --force               download even when the bundle did not change
  --timeout SECONDS     how long to wait for the whole answer (default ${PULL_TIMEOUT_SECONDS})
${exportOptionsHelp}  --no-split, --no-half, --no-dedupe
                        turn off an option the effect's target profile turns on
Options left out take the defaults of each effect's target profile on the server.
`,
  async run(args, io) {
    const { positionals, values } = parseArgs({ args, allowPositionals: true, options: pullArgOptions });
    if (positionals.length > 0) throw new UsageError(`unexpected ${positionals.join(" ")}: pull takes only options`);
    const base = serverBase(values.server ?? process.env.SKEWSMITH_URL);
    const token = values.token ?? process.env.SKEWSMITH_TOKEN ?? "";
    if (token === "")
      throw new UsageError("an API token is required: --token TOKEN, or set SKEWSMITH_TOKEN (create one on your settings page)");
    if (/\s/.test(token)) throw new UsageError("--token: a token has no spaces or line breaks; copy it again from your settings page");
    if ((values.effect === undefined) === (values.project === undefined))
      throw new UsageError("give one of --effect ID or --project ID (what to pull)");
    const kind = values.effect !== undefined ? "effect" : "project";
    const id = (values.effect ?? values.project)!;
    if (!UUID.test(id))
      throw new UsageError(`--${kind}: ${JSON.stringify(id)} is not allowed; allowed an id such as 3f2b8c1e-5d4a-4b7e-9c0f-1a2b3c4d5e6f`);
    const out = values.out;
    if (!out) throw new UsageError("--out DIR is required (the folder to unpack the bundle into)");
    let timeout = PULL_TIMEOUT_SECONDS;
    if (values.timeout !== undefined) {
      timeout = /^\d+$/.test(values.timeout) ? Number(values.timeout) : Number.NaN;
      if (!(timeout >= 1 && timeout <= 3600))
        throw new UsageError(
          `--timeout: ${JSON.stringify(values.timeout)} is not allowed; allowed a whole number of seconds from 1 to 3600`,
        );
    }
    const query = exportQuery(values);

    const address = new URL(`api/v1/${kind}s/${id}/export.zip`, base);
    address.search = query.toString();
    const source = address.toString();
    const server = base.origin;

    try {
      const previous = values.force ? null : await readPullState(out);
      const conditional = previous !== null && previous.source === source && (await folderIntact(out, previous));
      let response: Response;
      try {
        response = await fetch(address, {
          headers: {
            Authorization: `Bearer ${token}`,
            Accept: "application/zip",
            "User-Agent": "skewsmith-pull",
            ...(conditional && { "If-None-Match": previous.etag }),
          },
          redirect: "manual",
          signal: AbortSignal.timeout(timeout * 1000),
        });
      } catch (error) {
        throw new PullError(networkReason(error, server, timeout));
      }
      if (response.status === 304 && conditional) {
        io.stderr(`skewsmith pull: ${out} is up to date (the ${kind} has not changed since the last pull)\n`);
        return 0;
      }
      if (response.status >= 300 && response.status < 400)
        throw new PullError(`${server} redirected to ${response.headers.get("Location") ?? "elsewhere"}; give that address as --server`);
      if (response.status !== 200) {
        const message = await answerMessage(response);
        const what: Record<number, string> = {
          400: "the server refused the options",
          401: "the server refused the token",
          403: "not allowed",
          404: `no such ${kind}`,
          405: "the server does not take this request (is --server a Skewsmith address?)",
          429: "the server asks to slow down",
        };
        throw new PullError(`${what[response.status] ?? `the server answered ${response.status}`}: ${message}`);
      }
      const type = (response.headers.get("Content-Type") ?? "").split(";")[0].trim().toLowerCase();
      if (type !== "application/zip")
        throw new PullError(`the server answered with ${type || "no Content-Type"}, not a zip (is --server the Skewsmith address?)`);
      const etag = response.headers.get("ETag");
      let body: Uint8Array;
      try {
        body = await readBody(response, PULL_MAX_DOWNLOAD_BYTES);
      } catch (error) {
        if (error instanceof PullError) throw error;
        throw new PullError(networkReason(error, server, timeout));
      }
      checkDigest(response, body);
      const files = await unpackBundle(body);
      await replaceFolder(out, files, { source, etag: etag ?? "" });
      let bytes = 0;
      for (const [name, data] of [...files].sort(([a], [b]) => (a < b ? -1 : 1))) {
        bytes += data.length;
        io.stdout(`${out}/${name}\t${data.length} bytes\n`);
      }
      io.stderr(`skewsmith pull: ${files.size} files, ${bytes} bytes, from ${server} into ${out}\n`);
      return 0;
    } catch (error) {
      if (error instanceof PullError) {
        io.stderr(`skewsmith pull: ${error.message}\n`);
        return 1;
      }
      throw error;
    }
  },
};
