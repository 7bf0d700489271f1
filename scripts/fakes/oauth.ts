/**
 * A local stand-in for GitHub's OAuth web flow and its /user API, for development and tests only.
 * It shows a small page listing the demo accounts; choosing one sends the browser back to the app
 * with a one-time code (and the app's state, untouched), which the app trades for a token here.
 *
 *   GET  /login/oauth/authorize     the account chooser
 *   POST /login/oauth/authorize     choose (or cancel): redirect to redirect_uri with code+state (or error+state)
 *   POST /login/oauth/access_token  code → access token (client id and secret required)
 *   GET  /api/user, /api/user/emails the account behind a bearer token
 *   POST /_accounts                 tests only: add an account (JSON: githubId, login, name, email) to the chooser
 *
 * Run: node --import tsx scripts/fakes/oauth.ts  (FAKE_GITHUB_PORT, FAKE_GITHUB_CLIENT_ID, FAKE_GITHUB_CLIENT_SECRET)
 */
import { randomBytes, timingSafeEqual } from "node:crypto";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import { DEMO_PEOPLE, DEMO_TEAM, type DemoPerson } from "../../app/demo/people.ts";

export interface FakeGitHubOptions {
  port?: number;
  clientId: string;
  clientSecret: string;
  accounts?: readonly DemoPerson[];
}

export interface FakeGitHub {
  /** Base URL of the web flow, e.g. http://127.0.0.1:54330 (authorize at /login/oauth/authorize). */
  url: string;
  /** Base URL of the API, e.g. http://127.0.0.1:54330/api (GET /user). */
  apiUrl: string;
  close(): Promise<void>;
}

/** How long a code may wait before the app trades it for a token, in milliseconds (GitHub uses 10 minutes). */
const CODE_LIFETIME_MS = 10 * 60 * 1000;

const escape = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] as string);

function sameSecret(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

async function readForm(req: IncomingMessage): Promise<URLSearchParams> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > 64 * 1024) throw new Error("form too large");
    chunks.push(chunk as Buffer);
  }
  return new URLSearchParams(Buffer.concat(chunks).toString("utf8"));
}

function send(res: ServerResponse, status: number, body: string, type = "text/html; charset=utf-8", headers: Record<string, string> = {}) {
  res.writeHead(status, { "Content-Type": type, "Cache-Control": "no-store", ...headers });
  res.end(body);
}

const json = (res: ServerResponse, status: number, value: unknown) => send(res, status, JSON.stringify(value), "application/json");

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escape(title)}</title><style>
body{margin:0;font:15px/1.5 system-ui,sans-serif;background:#eef0ea;color:#1e2420}
main{max-width:30rem;margin:3rem auto;padding:1.5rem;background:#fff;border:1px solid #c9cec4;border-radius:6px}
h1{font-size:1.15rem;margin:0 0 .25rem}p{margin:.25rem 0 1rem;color:#4a524c}
.note{font-size:.8rem;background:#fff6d8;border:1px solid #e6d48e;padding:.4rem .6rem;border-radius:4px}
button{display:block;width:100%;text-align:left;margin:.5rem 0;padding:.6rem .8rem;font:inherit;background:#f7f8f5;border:1px solid #b9c0b3;border-radius:5px;cursor:pointer}
button:hover,button:focus{background:#e3eadf;outline:2px solid #5d7a55}
.who{font-weight:600}.login{font-family:monospace;color:#4a524c}.what{display:block;font-size:.85rem;color:#4a524c}
.cancel{background:none;border:none;text-align:center;color:#4a524c;text-decoration:underline}
</style></head><body><main>${body}</main></body></html>`;
}

/** Starts the stand-in on 127.0.0.1 (port 0 picks a free one). */
export async function startFakeGitHub(options: FakeGitHubOptions): Promise<FakeGitHub> {
  const accounts: DemoPerson[] = [...(options.accounts ?? DEMO_PEOPLE)];
  const codes = new Map<string, { login: string; redirectUri: string; expires: number }>();
  const tokens = new Map<string, string>();

  function chooser(params: URLSearchParams): string {
    const hidden = ["client_id", "redirect_uri", "state"]
      .map((k) => `<input type="hidden" name="${k}" value="${escape(params.get(k) ?? "")}">`)
      .join("");
    const buttons = accounts
      .map(
        (a) =>
          `<button type="submit" name="login" value="${escape(a.login)}"><span class="who">${escape(a.name)}</span> <span class="login">@${escape(a.login)}</span>` +
          `<span class="what">${escape(a.job)}${a.role ? ` · ${a.role} of ${escape(DEMO_TEAM.name)}` : ""}</span></button>`,
      )
      .join("");
    return page(
      "Choose a demo account",
      `<p class="note">Local sign-in stand-in for development and tests. This is not GitHub; no password is asked.</p>
<h1>Sign in to Skewsmith as…</h1><p>Choose one of the demo accounts.</p>
<form method="post" action="/login/oauth/authorize">${hidden}${buttons}
<button type="submit" name="deny" value="1" class="cancel">Cancel and go back</button></form>`,
    );
  }

  function checkClient(params: URLSearchParams): string | null {
    if (params.get("client_id") !== options.clientId) return `Unknown client_id “${params.get("client_id") ?? ""}”.`;
    const redirect = params.get("redirect_uri");
    if (!redirect || !/^https?:\/\//.test(redirect)) return "redirect_uri is missing or not an http(s) URL.";
    if (!params.get("state")) return "state is missing: the app must send one.";
    return null;
  }

  const server = createServer(async (req, res) => {
    try {
      const url = new URL(req.url ?? "/", "http://127.0.0.1");
      if (url.pathname === "/login/oauth/authorize" && req.method === "GET") {
        const problem = checkClient(url.searchParams);
        if (problem) return send(res, 400, page("Bad sign-in request", `<h1>Bad sign-in request</h1><p>${escape(problem)}</p>`));
        return send(res, 200, chooser(url.searchParams));
      }
      if (url.pathname === "/login/oauth/authorize" && req.method === "POST") {
        const form = await readForm(req);
        const problem = checkClient(form);
        if (problem) return send(res, 400, page("Bad sign-in request", `<h1>Bad sign-in request</h1><p>${escape(problem)}</p>`));
        const back = new URL(form.get("redirect_uri") as string);
        back.searchParams.set("state", form.get("state") as string);
        if (form.get("deny")) {
          back.searchParams.set("error", "access_denied");
          back.searchParams.set("error_description", "The person cancelled signing in.");
        } else {
          const account = accounts.find((a) => a.login === form.get("login"));
          if (!account) return send(res, 400, page("Unknown account", `<h1>Unknown account</h1>`));
          const code = randomBytes(16).toString("hex");
          codes.set(code, { login: account.login, redirectUri: back.origin + back.pathname, expires: Date.now() + CODE_LIFETIME_MS });
          back.searchParams.set("code", code);
        }
        res.writeHead(302, { Location: back.toString(), "Cache-Control": "no-store" });
        return res.end();
      }
      if (url.pathname === "/login/oauth/access_token" && req.method === "POST") {
        const form = await readForm(req);
        let id = form.get("client_id") ?? "";
        let secret = form.get("client_secret") ?? "";
        const basic = /^Basic (.+)$/i.exec(req.headers.authorization ?? "");
        if (basic) {
          const decoded = Buffer.from(basic[1], "base64").toString("utf8");
          const colon = decoded.indexOf(":");
          id = decoded.slice(0, colon);
          secret = decoded.slice(colon + 1);
        }
        if (id !== options.clientId || !sameSecret(secret, options.clientSecret))
          return json(res, 401, { error: "invalid_client", error_description: "The client id or secret is wrong." });
        if (form.get("grant_type") !== "authorization_code")
          return json(res, 400, { error: "unsupported_grant_type", error_description: "Only authorization_code is supported." });
        const code = form.get("code") ?? "";
        const entry = codes.get(code);
        codes.delete(code); // one use only, even when the check below fails
        if (!entry || entry.expires < Date.now())
          return json(res, 400, { error: "bad_verification_code", error_description: "The code is wrong, used or expired." });
        const redirect = form.get("redirect_uri");
        if (redirect !== null && redirect !== entry.redirectUri)
          return json(res, 400, { error: "redirect_uri_mismatch", error_description: "redirect_uri differs from the authorize request." });
        const token = `fake_${randomBytes(20).toString("hex")}`;
        tokens.set(token, entry.login);
        return json(res, 200, { access_token: token, token_type: "bearer", scope: "read:user,user:email" });
      }
      if ((url.pathname === "/api/user" || url.pathname === "/api/user/emails") && req.method === "GET") {
        const bearer = /^(?:Bearer|token) (.+)$/i.exec(req.headers.authorization ?? "");
        const login = bearer ? tokens.get(bearer[1]) : undefined;
        const account = accounts.find((a) => a.login === login);
        if (!account) return json(res, 401, { message: "Bad credentials" });
        if (url.pathname === "/api/user/emails") return json(res, 200, [{ email: account.email, primary: true, verified: true }]);
        return json(res, 200, { id: account.githubId, login: account.login, name: account.name, email: account.email, avatar_url: null });
      }
      if (url.pathname === "/_accounts" && req.method === "POST") {
        // Tests make their own people; each is offered by the chooser like a demo account.
        const chunks: Buffer[] = [];
        for await (const chunk of req) chunks.push(chunk as Buffer);
        const body = JSON.parse(Buffer.concat(chunks).toString("utf8")) as Partial<DemoPerson>;
        if (typeof body.githubId !== "number" || typeof body.login !== "string" || !/^[A-Za-z0-9-]{1,39}$/.test(body.login))
          return json(res, 400, { message: "githubId (number) and login (GitHub-style) are required" });
        const account: DemoPerson = {
          githubId: body.githubId,
          login: body.login,
          name: typeof body.name === "string" ? body.name : body.login,
          email: typeof body.email === "string" ? body.email : `${body.login}@example.test`,
          job: "test account",
          role: null,
        };
        const at = accounts.findIndex((a) => a.login === account.login);
        if (at >= 0) accounts[at] = account;
        else accounts.push(account);
        return json(res, 201, { login: account.login });
      }
      if (url.pathname === "/" && req.method === "GET")
        return send(res, 200, "Local GitHub sign-in stand-in for Skewsmith (development and tests only).\n", "text/plain; charset=utf-8");
      // The browser asks every page's origin for an icon; the stand-in has none to show, and says so without an error.
      if (url.pathname === "/favicon.ico" && req.method === "GET") {
        res.writeHead(204).end();
        return;
      }
      return json(res, 404, { message: "Not Found" });
    } catch (error) {
      return json(res, 500, { message: (error as Error).message });
    }
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port ?? 0, "127.0.0.1", () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://127.0.0.1:${port}`;
  return {
    url,
    apiUrl: `${url}/api`,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const clientId = process.env.FAKE_GITHUB_CLIENT_ID;
  const clientSecret = process.env.FAKE_GITHUB_CLIENT_SECRET;
  if (!clientId || !clientSecret) {
    console.error("fake GitHub: set FAKE_GITHUB_CLIENT_ID and FAKE_GITHUB_CLIENT_SECRET");
    process.exit(1);
  }
  const fake = await startFakeGitHub({ port: Number(process.env.FAKE_GITHUB_PORT ?? 54330), clientId, clientSecret });
  console.error(`fake GitHub: sign-in stand-in at ${fake.url}`);
  const stop = () => void fake.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
