/**
 * Starts the production server (server.js over this run's build) as a child process for a test, on a port the
 * operating system picks (PORT=0): the server reports the port it bound in its "listening" log line, so no port is
 * ever chosen here, released and bound later by someone else. Its JSON log lines are kept for the test to read.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import path from "node:path";
import { createServer, type AddressInfo } from "node:net";
import { createInterface } from "node:readline";
import { fileURLToPath } from "node:url";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");

/** This run's build folder (scripts/test builds into a folder of its own and says which). */
export function buildDir(): string {
  return path.resolve(ROOT, process.env.SKEWSMITH_BUILD_DIR || "build");
}

export interface AppProcess {
  readonly url: string;
  readonly child: ChildProcess;
  /** Every JSON line the server printed so far, parsed. */
  readonly lines: Record<string, unknown>[];
  /** Everything it printed that was not a JSON line (stack traces of a crash, say). */
  readonly other: string[];
  /** Waits for a log line that matches. */
  waitForLine(match: (line: Record<string, unknown>) => boolean, timeoutMs?: number): Promise<Record<string, unknown>>;
  /** Stops it with SIGTERM (SIGKILL after 10 s) and waits for it to exit. */
  stop(): Promise<void>;
  /** Kills it with SIGKILL, as a crash would, and waits for it to exit. */
  kill(): Promise<void>;
}

export interface AppSettings {
  databaseUrl: string;
  /** Extra environment (the GitHub stand-in's URLs, mail, rate limits…); APP_URL defaults to the bound address. */
  env?: Record<string, string | undefined>;
}

/** A port for a server that cannot take port 0 (an old checkout's react-router-serve); it retries on a clash. */
function pickPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const { port } = probe.address() as AddressInfo;
      probe.close(() => resolve(port));
    });
  });
}

/**
 * Starts server.js on 127.0.0.1:0 and resolves once it answers /healthz. With SKEWSMITH_SERVER_DIR set, the server
 * of that (built) checkout instead, for comparing with an older commit: its own server.js, or react-router-serve.
 */
export async function startApp(settings: AppSettings): Promise<AppProcess> {
  const other = process.env.SKEWSMITH_SERVER_DIR ? path.resolve(process.env.SKEWSMITH_SERVER_DIR) : null;
  if (other && !existsSync(path.join(other, "server.js"))) return startApp_(settings, other, await pickPort());
  return startApp_(settings, other, 0);
}

async function startApp_(settings: AppSettings, otherDir: string | null, fixedPort: number): Promise<AppProcess> {
  const dir = otherDir ?? ROOT;
  const server = otherDir ? path.join(otherDir, "build/server/index.js") : path.join(buildDir(), "server/index.js");
  if (!existsSync(server)) throw new Error(`${server} is missing: scripts/test builds the app first (react-router build).`);
  const args = fixedPort ? [path.join(ROOT, "node_modules/@react-router/serve/bin.js"), server] : [path.join(dir, "server.js")];
  const child = spawn(process.execPath, args, {
    cwd: dir,
    env: {
      ...process.env,
      NODE_ENV: "production",
      HOST: "127.0.0.1",
      PORT: String(fixedPort),
      APP_URL: fixedPort ? `http://127.0.0.1:${fixedPort}` : undefined,
      SKEWSMITH_BUILD_DIR: otherDir ? "" : process.env.SKEWSMITH_BUILD_DIR,
      DATABASE_URL: settings.databaseUrl,
      SESSION_SECRET: randomBytes(32).toString("hex"),
      GITHUB_CLIENT_ID: "skewsmith-test",
      GITHUB_CLIENT_SECRET: randomBytes(16).toString("hex"),
      GITHUB_OAUTH_URL: "http://127.0.0.1:9",
      GITHUB_API_URL: "http://127.0.0.1:9/api",
      SMTP_URL: undefined,
      DEV_MAILBOX_URL: undefined,
      ...settings.env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const lines: Record<string, unknown>[] = [];
  const other: string[] = [];
  const waiters = new Set<() => void>();
  const take = (text: string) => {
    try {
      const parsed = JSON.parse(text) as unknown;
      if (parsed && typeof parsed === "object") lines.push(parsed as Record<string, unknown>);
      else other.push(text);
    } catch {
      other.push(text);
    }
    if (other.length > 2000) other.splice(0, other.length - 2000);
    for (const wake of waiters) wake();
  };
  createInterface({ input: child.stdout! }).on("line", take);
  createInterface({ input: child.stderr! }).on("line", take);
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));

  async function waitForLine(match: (line: Record<string, unknown>) => boolean, timeoutMs = 30_000) {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const found = lines.find(match);
      if (found) return found;
      if (child.exitCode !== null || child.signalCode !== null)
        throw new Error(
          `the server exited (${child.exitCode ?? child.signalCode}):\n${[...other, ...lines.map((l) => JSON.stringify(l))].slice(-40).join("\n")}`,
        );
      if (Date.now() > deadline) throw new Error(`no matching log line within ${timeoutMs} ms:\n${other.slice(-20).join("\n")}`);
      await new Promise<void>((resolve) => {
        const wake = () => {
          waiters.delete(wake);
          clearTimeout(timer);
          resolve();
        };
        const timer = setTimeout(wake, 200);
        waiters.add(wake);
      });
    }
  }

  let url = `http://127.0.0.1:${fixedPort}`;
  if (!fixedPort) {
    const listening = await waitForLine((l) => l.msg === "listening").catch(async (error) => {
      child.kill("SIGKILL");
      throw error;
    });
    url = String(listening.url);
  }
  const deadline = Date.now() + 30_000;
  while (
    !(await fetch(`${url}/healthz`).then(
      (r) => r.ok,
      () => false,
    ))
  ) {
    if (Date.now() > deadline || child.exitCode !== null) {
      child.kill("SIGKILL");
      throw new Error(`the app did not answer ${url}/healthz:\n${other.slice(-20).join("\n")}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url,
    child,
    lines,
    other,
    waitForLine,
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill("SIGTERM");
      const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
      await exited;
      clearTimeout(timer);
    },
    async kill() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill("SIGKILL");
      await exited;
    },
  };
}
