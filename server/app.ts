/**
 * The Node server around the app (after the framework's custom-server template): it is the server build's entry
 * (vite.config.ts), started by server.js. Per request, in this order:
 *
 *   request context   a request id, the client address, the signed-in person once known (AsyncLocalStorage), and
 *                     one JSON log line when the answer is done (id, method, path, status, duration, user);
 *   compression       gzip or brotli when the client takes it;
 *   static files      /assets/* (hashed, cached for a year) and the files at the build's client root; in development
 *                     Vite serves them instead;
 *   the app           app/serverHandler.server.ts: origin check, every route behind the catch-all, headers.
 */
import { performance } from "node:perf_hooks";
import { readdirSync } from "node:fs";
import path from "node:path";
import { writeReadableStreamToWritable } from "@react-router/node";
import compression from "compression";
import express, { type NextFunction, type Request as ExpressRequest, type RequestHandler, type Response as ExpressResponse } from "express";
import type { ServerBuild } from "react-router";
import * as builtApp from "virtual:react-router/server-build";
import { db } from "../app/db.server.ts";
import { env } from "../app/env.server.ts";
import { log, logError } from "../app/log.server.ts";
import { loggablePath, newRequestId, runWithRequest, type RequestInfo } from "../app/requestContext.server.ts";
import { commonSecurityHeaders } from "../app/security.server.ts";
import { createFetchHandler, finishResponse, refusal, wholeBodyOf } from "../app/serverHandler.server.ts";

export interface AppOptions {
  mode: "production" | "development";
  /** Production: the build's client folder (build/client), served as static files. */
  clientDir?: string;
  /** Development: Vite's middlewares (assets, HMR) and how to load the current build. */
  assets?: RequestHandler;
  loadBuild?: () => Promise<ServerBuild>;
}

/** The client's address: the socket's, or the entry `TRUST_PROXY` hops from the right of X-Forwarded-For. */
function clientAddress(req: ExpressRequest, trustProxy: number): string {
  const socket = req.socket.remoteAddress ?? "unknown";
  if (trustProxy === 0) return socket;
  const forwarded = String(req.headers["x-forwarded-for"] ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  return forwarded[forwarded.length - trustProxy] ?? forwarded[0] ?? socket;
}

function pathnameOf(url: string): string {
  const q = url.search(/[?#]/);
  return q === -1 ? url : url.slice(0, q);
}

/** Opens the request context and writes the request's log line when its answer is done. */
function requestContext(trustProxy: number): RequestHandler {
  return (req, res, next) => {
    const info: RequestInfo = {
      id: newRequestId(),
      method: req.method,
      path: loggablePath(pathnameOf(req.originalUrl ?? req.url)),
      clientAddress: clientAddress(req, trustProxy),
      startedAt: performance.now(),
    };
    res.setHeader("X-Request-Id", info.id);
    let logged = false;
    const done = (aborted: boolean) => {
      if (logged) return;
      logged = true;
      const bytes = Number(res.getHeader("Content-Length"));
      log("info", "request", {
        requestId: info.id,
        method: info.method,
        path: info.path,
        status: aborted ? 499 : res.statusCode,
        durationMs: Math.round((performance.now() - info.startedAt) * 10) / 10,
        ...(Number.isFinite(bytes) ? { bytes } : {}),
        ...(info.userId ? { userId: info.userId } : {}),
        client: info.clientAddress,
        ...(aborted ? { aborted: true } : {}),
      });
    };
    res.once("finish", () => done(false));
    res.once("close", () => done(!res.writableFinished));
    runWithRequest(info, next);
  };
}

/** The build's static files: hashed assets (immutable) and the few files at the client root; nothing else is looked up. */
function staticFiles(clientDir: string, https: boolean): RequestHandler {
  const headers = commonSecurityHeaders({ https });
  const setHeaders = (res: ExpressResponse) => {
    for (const [name, value] of headers) res.setHeader(name, value);
  };
  const assets = express.static(path.join(clientDir, "assets"), {
    immutable: true,
    maxAge: "1y",
    index: false,
    fallthrough: false,
    setHeaders,
  });
  const rootFiles = new Set(
    readdirSync(clientDir, { withFileTypes: true })
      .filter((entry) => entry.isFile())
      .map((entry) => `/${entry.name}`),
  );
  const root = express.static(clientDir, { maxAge: "1h", index: false, setHeaders });
  return (req, res, next) => {
    if (req.method !== "GET" && req.method !== "HEAD") return next();
    if (req.path.startsWith("/assets/")) {
      req.url = req.url.slice("/assets".length);
      return assets(req, res, next);
    }
    if (rootFiles.has(req.path)) return root(req, res, next);
    next();
  };
}

/**
 * The request body as a web stream, with backpressure. Unlike the framework's adapter, giving up on it (a reader
 * that stops at a size limit) drops the rest instead of destroying the socket, so the refusal can still be sent;
 * settleUnreadBody decides whether the connection stays open.
 */
function requestBody(req: ExpressRequest, res: ExpressResponse): ReadableStream<Uint8Array> {
  const drop = () => {
    req.off("data", onData);
    req.on("data", () => {});
    req.resume();
  };
  // settleUnreadBody drops what is left once the answer is out.
  res.locals.dropBody = drop;
  const onData = (chunk: Buffer) => {
    try {
      controller.enqueue(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength));
      if ((controller.desiredSize ?? 0) <= 0) req.pause();
    } catch {
      // Already closed or cancelled.
    }
  };
  let controller!: ReadableStreamDefaultController<Uint8Array>;
  return new ReadableStream<Uint8Array>(
    {
      start(c) {
        controller = c;
        req.on("data", onData);
        req.once("end", () => {
          try {
            controller.close();
          } catch {
            // Cancelled before the end.
          }
        });
        const broken = () => {
          try {
            controller.error(new Error("The client stopped sending the request body."));
          } catch {
            // Ended or cancelled already.
          }
        };
        req.once("error", broken);
        req.once("close", () => {
          if (!req.complete) broken();
        });
      },
      pull() {
        req.resume();
      },
      cancel() {
        drop();
      },
    },
    { highWaterMark: 64 * 1024, size: (chunk) => chunk.byteLength },
  );
}

/** Node's request as a web Request, with APP_URL's origin (the Host header is never trusted for URLs). */
function toWebRequest(req: ExpressRequest, res: ExpressResponse, origin: string): Request {
  const controller = new AbortController();
  res.once("close", () => {
    if (!res.writableFinished) controller.abort();
  });
  const headers = new Headers();
  for (let i = 0; i < req.rawHeaders.length; i += 2) {
    try {
      headers.append(req.rawHeaders[i], req.rawHeaders[i + 1]);
    } catch {
      // A header value the fetch API refuses (Node is more lenient) is dropped rather than failing the request.
    }
  }
  const url = new URL(req.originalUrl ?? req.url, origin);
  const init: RequestInit & { duplex?: "half" } = { method: req.method, headers, signal: controller.signal };
  if (req.method !== "GET" && req.method !== "HEAD") {
    init.body = requestBody(req, res);
    init.duplex = "half";
  }
  return new Request(url, init);
}

/**
 * A request body left unread (a refusal made before reading it) is read and dropped up to this size, keeping the
 * connection: a client still sending then reads the answer instead of a reset. Four times the largest body any route
 * accepts (a 4 MiB sprite), so a refused upload just over a limit is answered cleanly; beyond it the connection is cut.
 */
const DRAIN_MAX_BYTES = 16 * 1024 * 1024;

/**
 * After an answer that did not read the whole request body: drop the rest when it is small, so the connection can
 * serve the next request; otherwise close the connection rather than read an attacker's gigabytes.
 */
function settleUnreadBody(req: ExpressRequest, res: ExpressResponse): void {
  if (req.complete || req.method === "GET" || req.method === "HEAD") return;
  const declared = Number(req.headers["content-length"]);
  if (Number.isFinite(declared) && declared <= DRAIN_MAX_BYTES) {
    const drop = res.locals.dropBody as (() => void) | undefined;
    if (drop) drop();
    else {
      req.on("data", () => {});
      req.resume();
    }
  } else {
    if (!res.headersSent) res.setHeader("Connection", "close");
    res.once("finish", () => req.destroy());
  }
}

async function sendWebResponse(res: ExpressResponse, response: Response, method: string, req?: ExpressRequest): Promise<void> {
  if (res.destroyed || res.writableEnded) {
    await response.body?.cancel().catch(() => {});
    return;
  }
  if (req) settleUnreadBody(req, res);
  res.statusCode = response.status;
  if (response.statusText) res.statusMessage = response.statusText;
  for (const [name, value] of response.headers) if (name !== "set-cookie") res.setHeader(name, value);
  const cookies = response.headers.getSetCookie();
  if (cookies.length > 0) res.setHeader("Set-Cookie", cookies);
  if (!response.body || method === "HEAD") {
    await response.body?.cancel().catch(() => {});
    res.end();
    return;
  }
  // A rendered page is already in memory: one call, without reading it back through its stream.
  const whole = wholeBodyOf(response);
  if (whole) {
    res.end(whole);
    return;
  }
  try {
    await writeReadableStreamToWritable(response.body, res);
  } catch (error) {
    if (!res.destroyed) throw error;
  }
}

/** The Express app: request context and log, compression, static files, then the app itself. */
export function createApp(options: AppOptions): express.Express {
  const config = env(); // fails fast, naming what is missing
  const https = config.appOrigin.startsWith("https:");
  const handle = createFetchHandler({ build: options.loadBuild ?? (builtApp as unknown as ServerBuild), mode: options.mode });
  const app = express();
  app.disable("x-powered-by");
  app.use(requestContext(config.TRUST_PROXY));
  app.use(compression());
  if (options.assets) app.use(options.assets);
  if (options.clientDir) app.use(staticFiles(options.clientDir, https));
  app.use(async (req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    try {
      const request = toWebRequest(req, res, config.appOrigin);
      await sendWebResponse(res, await handle(request), req.method, req);
    } catch (error) {
      next(error);
    }
  });
  // Last resort for an error in the layers above (a malformed URL, a socket that broke mid-answer).
  app.use(async (error: unknown, req: ExpressRequest, res: ExpressResponse, _next: NextFunction) => {
    logError("the server failed to answer", error);
    if (res.headersSent) return void res.destroy();
    const status = (error as { status?: unknown }).status;
    const code = typeof status === "number" && status >= 400 && status < 500 ? status : 500;
    const message =
      code === 500 ? "Something went wrong on our side. It was logged; try again in a moment." : "That request was not understood.";
    const request = new Request(new URL(pathnameOf(req.url).replace(/^\/*/, "/"), config.appOrigin));
    await sendWebResponse(res, await finishResponse(refusal(request, code, message), { https }), req.method, req);
  });
  return app;
}

/** Closes the app's database pool (after the HTTP server stopped taking requests). */
export async function shutdown(): Promise<void> {
  await db().$client.end();
}
