/**
 * Renders a page on the server (after the framework's default Node entry), with this response's security policy:
 * a fresh nonce for the framework's inline scripts, the Content-Security-Policy that allows only those and the
 * app's own bundles, and `Cache-Control: private, no-store` (pages show a signed-in person's data). The whole page
 * is rendered before it is sent (the pages use no streaming), which costs one write instead of dozens.
 */
import { Writable } from "node:stream";
import { renderToPipeableStream } from "react-dom/server";
import { isRouteErrorResponse, ServerRouter, type EntryContext, type HandleErrorFunction } from "react-router";
import { env } from "./env.server.ts";
import { log, logError } from "./log.server.ts";
import { NonceContext } from "./nonce.ts";
import { randomText } from "./requestContext.server.ts";
import { documentCsp } from "./security.server.ts";
import { wholeResponse } from "./serverHandler.server.ts";

export const streamTimeout = 5_000;

export default function handleRequest(request: Request, responseStatusCode: number, responseHeaders: Headers, routerContext: EntryContext) {
  const nonce = randomText(16, "base64");
  const config = env();
  responseHeaders.set(
    "Content-Security-Policy",
    documentCsp({
      nonce,
      formTargets: [config.oauthOrigin],
      https: config.appOrigin.startsWith("https:"),
      development: config.NODE_ENV === "development",
    }),
  );
  responseHeaders.set("Cache-Control", "private, no-store");
  responseHeaders.set("Content-Type", "text/html; charset=utf-8");
  // https://httpwg.org/specs/rfc9110.html#HEAD
  if (request.method.toUpperCase() === "HEAD") return new Response(null, { status: responseStatusCode, headers: responseHeaders });

  return new Promise<Response>((resolve, reject) => {
    let status = responseStatusCode;
    let allReady = false;
    const chunks: Buffer[] = [];
    const timer = setTimeout(() => abort(), streamTimeout + 1000);
    const sink = new Writable({
      write(chunk: Buffer, _encoding, callback) {
        chunks.push(chunk);
        callback();
      },
      final(callback) {
        clearTimeout(timer);
        const body = Buffer.concat(chunks);
        responseHeaders.set("Content-Length", String(body.byteLength));
        resolve(wholeResponse(body, { status, headers: responseHeaders }));
        callback();
      },
    });
    const { pipe, abort } = renderToPipeableStream(
      <NonceContext.Provider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceContext.Provider>,
      {
        nonce,
        onAllReady() {
          allReady = true;
          pipe(sink);
        },
        onShellError(error: unknown) {
          clearTimeout(timer);
          reject(error);
        },
        onError(error: unknown) {
          status = 500;
          // Errors before the page is ready reject and are logged by the framework (handleError below).
          if (allReady) logError("page rendering failed", error);
        },
      },
    );
  });
}

/** Errors the framework caught outside the routes' catch-all (rendering, its own checks), logged with the request id. */
export const handleError: HandleErrorFunction = (error, { request }) => {
  if (request.signal.aborted) return;
  if (isRouteErrorResponse(error)) {
    // The framework's own refusals (a method a route does not take, say) are the client's mistake, not ours.
    log("warn", "request refused by the framework", {
      status: error.status,
      reason: (error as { error?: Error }).error?.message ?? error.statusText,
    });
    return;
  }
  logError("unhandled error", error, { where: "framework" });
};
