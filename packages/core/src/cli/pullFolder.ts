/**
 * The folder `skewsmith pull` fills: a bundle is checked and unpacked into a temporary folder beside it, then swapped
 * in whole, so a build never sees half of one; a small state file inside remembers what was pulled (the ETag and each
 * file's SHA-256) so the next pull can ask the server whether anything changed.
 */
import { createHash, randomBytes } from "node:crypto";
import { mkdir, readdir, readFile, rename, rm, stat, writeFile } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import type { Unzipped } from "fflate";

/** The state file's name inside the pulled folder. */
export const PULL_STATE_FILE = ".skewsmith-pull.json";
/** Format tag of the state file. */
export const PULL_STATE_FORMAT = "skewsmith.pull/1";
/** Most files a bundle may hold (a project of a thousand effects holds about six thousand). */
export const PULL_MAX_FILES = 20_000;
/** Most bytes a bundle may unpack to: 1 GiB, far above any bundle (one effect's tables are capped at 32 MiB). */
export const PULL_MAX_UNPACKED_BYTES = 1024 * 1024 * 1024;

/** A failure of `skewsmith pull` that is not a usage mistake: printed as one line, exit code 1. */
export class PullError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PullError";
  }
}

/** What a pull remembers beside the files. */
export interface PullState {
  readonly format: typeof PULL_STATE_FORMAT;
  /** The address pulled, without the token: server, path and query. */
  readonly source: string;
  readonly etag: string;
  /** Every file of the bundle, by its path inside the folder, with its SHA-256 (hex). */
  readonly files: Readonly<Record<string, string>>;
}

const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/**
 * Why a name inside a zip cannot be written into the folder, or null when it can: only plain relative paths of
 * ordinary names, so nothing lands outside the folder (no "..", no absolute or drive paths, no backslashes) and no
 * name means something else on another system (control characters, a trailing dot or space).
 */
export function unsafeEntryName(name: string): string | null {
  if (name === "" || name.length > 400) return "an empty or overlong name";
  if (/[\u0000-\u001f\u007f\\:*?"<>|]/.test(name)) return "a control character, backslash or a character Windows refuses";
  if (name.startsWith("/")) return "an absolute path";
  for (const part of name.split("/")) {
    if (part === "" || part === "." || part === "..") return `a "${part}" path segment`;
    if (/[. ]$/.test(part)) return "a name ending in a dot or space";
  }
  if (name === PULL_STATE_FILE) return "the name of the pull state file";
  return null;
}

/** Unpacks a bundle after checking every name and the declared sizes; a broken or hostile zip is a PullError. */
export async function unpackBundle(zip: Uint8Array): Promise<Map<string, Uint8Array>> {
  let count = 0;
  let total = 0;
  let refusal: string | null = null;
  const declared = new Map<string, number>();
  // Loaded here, not with the module, so that `skewsmith --help` does not load fflate (commands.ts imports every command).
  const { unzip } = await import("fflate");
  const files = await new Promise<Unzipped>((resolve, reject) => {
    try {
      unzip(
        zip,
        {
          filter(file) {
            if (file.name.endsWith("/")) return false; // a folder entry: folders come from the file paths
            count += 1;
            total += file.originalSize;
            const problem = unsafeEntryName(file.name);
            if (problem && refusal === null) refusal = `the bundle holds ${JSON.stringify(file.name.slice(0, 80))}, which has ${problem}`;
            if (count > PULL_MAX_FILES && refusal === null) refusal = `the bundle holds more than ${PULL_MAX_FILES} files`;
            if (total > PULL_MAX_UNPACKED_BYTES && refusal === null)
              refusal = `the bundle would unpack to more than ${PULL_MAX_UNPACKED_BYTES} bytes`;
            if (declared.has(file.name) && refusal === null) refusal = `the bundle holds ${JSON.stringify(file.name)} twice`;
            declared.set(file.name, file.originalSize);
            return refusal === null;
          },
        },
        (error, data) => (error ? reject(error) : resolve(data)),
      );
    } catch (error) {
      reject(error);
    }
  }).catch((error: unknown) => {
    throw new PullError(`the server's answer is not a valid zip (${error instanceof Error ? error.message : String(error)})`);
  });
  if (refusal !== null) throw new PullError(`refusing the bundle: ${refusal}`);
  if (declared.size === 0) throw new PullError("the server's answer is not a valid zip (it holds no files)");
  const out = new Map<string, Uint8Array>();
  const lower = new Set<string>();
  for (const [name, bytes] of Object.entries(files)) {
    if (bytes.length !== declared.get(name))
      throw new PullError(`the server's answer is not a valid zip (${name} is not the size its entry says)`);
    // Names differing only in case would overwrite each other on macOS and Windows.
    if (lower.has(name.toLowerCase()))
      throw new PullError(`refusing the bundle: it holds two files named ${JSON.stringify(name)} apart from case`);
    lower.add(name.toLowerCase());
    out.set(name, bytes);
  }
  return out;
}

/** The state of an earlier pull into `dir`, if it is there and readable; anything else counts as none. */
export async function readPullState(dir: string): Promise<PullState | null> {
  try {
    const state = JSON.parse(await readFile(join(dir, PULL_STATE_FILE), "utf8")) as PullState;
    if (state?.format !== PULL_STATE_FORMAT || typeof state.etag !== "string" || typeof state.source !== "string") return null;
    if (typeof state.files !== "object" || state.files === null) return null;
    return state;
  } catch {
    return null;
  }
}

/** True when every file the state lists is in `dir` with the same SHA-256, so the folder is as the last pull left it. */
export async function folderIntact(dir: string, state: PullState): Promise<boolean> {
  for (const [name, hash] of Object.entries(state.files)) {
    if (unsafeEntryName(name) !== null) return false;
    try {
      if (sha256(await readFile(join(dir, name))) !== hash) return false;
    } catch {
      return false;
    }
  }
  return true;
}

async function exists(path: string): Promise<boolean> {
  return stat(path).then(
    () => true,
    () => false,
  );
}

/**
 * Writes the files and the state into a temporary folder beside `dir`, then puts it in `dir`'s place: the old folder
 * is moved aside first and removed only once the new one is in. Any failure removes the temporary folder and leaves
 * `dir` as it was. A `dir` that holds files an earlier pull did not put there is refused, so a mistyped --out can
 * never replace someone's source folder.
 */
export async function replaceFolder(
  dir: string,
  files: ReadonlyMap<string, Uint8Array>,
  state: Omit<PullState, "files" | "format">,
): Promise<void> {
  const info = await stat(dir).catch(() => null);
  if (info && !info.isDirectory()) throw new PullError(`${dir} exists and is not a folder`);
  if (info && (await readdir(dir)).length > 0 && (await readPullState(dir)) === null)
    throw new PullError(`${dir} holds files that skewsmith pull did not put there; choose a new or empty folder for --out`);

  const parent = dirname(dir);
  await mkdir(parent, { recursive: true });
  const tag = randomBytes(6).toString("hex");
  const temp = join(parent, `.${basename(dir)}.pull-${tag}`);
  const old = join(parent, `.${basename(dir)}.old-${tag}`);
  try {
    await mkdir(temp);
    const hashes: Record<string, string> = {};
    for (const [name, bytes] of [...files].sort(([a], [b]) => (a < b ? -1 : 1))) {
      await mkdir(dirname(join(temp, name)), { recursive: true });
      await writeFile(join(temp, name), bytes);
      hashes[name] = sha256(bytes);
    }
    const full: PullState = { format: PULL_STATE_FORMAT, ...state, files: hashes };
    await writeFile(join(temp, PULL_STATE_FILE), `${JSON.stringify(full, null, 2)}\n`);
    if (info) {
      await rename(dir, old);
      try {
        await rename(temp, dir);
      } catch (error) {
        await rename(old, dir);
        throw error;
      }
      // The new folder is in place; a leftover copy of the old one is untidy but harmless.
      await rm(old, { recursive: true, force: true }).catch(() => {});
    } else {
      await rename(temp, dir);
    }
  } catch (error) {
    await rm(temp, { recursive: true, force: true });
    if (error instanceof PullError) throw error;
    const e = error as NodeJS.ErrnoException;
    const kept = (await exists(old)) && !(await exists(dir)) ? ` (the previous files are kept in ${old})` : "";
    throw new PullError(`could not write ${dir}: ${e.code ?? ""} ${e.message}${kept}`.replace(/\s+/g, " ").trim());
  }
}
