/**
 * Web security rules that hold for every response and every state-changing request, whatever route handles it
 * (pages, resource routes, the JSON API, static files). The server (app/serverHandler.server.ts, server/app.ts)
 * applies them, so a new route inherits them without doing anything; see docs/decisions/0011.
 */

/** Methods that change nothing by definition; everything else must come from this app's own pages. */
const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

export type OriginVerdict =
  { ok: true; via: "safe-method" | "origin" | "fetch-metadata" | "bearer-token" | "no-credentials" } | { ok: false; reason: string };

/**
 * Whether a request may change something: safe methods always; a request with a bearer token and no cookie (the
 * API and CLI, which a browser cannot be made to send with ambient credentials) unless it names another origin;
 * otherwise only when the browser
 * says it comes from this app's own origin, by `Origin` or, when a browser sends no Origin, `Sec-Fetch-Site`.
 * A request with neither header is refused: it cannot be told apart from one another site made a browser send.
 */
export function checkOrigin(request: Request, appOrigin: string): OriginVerdict {
  if (SAFE_METHODS.has(request.method.toUpperCase())) return { ok: true, via: "safe-method" };
  const headers = request.headers;
  const origin = headers.get("Origin");
  // Credentials in an Authorization header are sent by a build or a script, never by a browser on its own (another
  // site's page cannot add the header without a preflight this app never grants); a page that sends one anyway
  // still has to be ours. Without a cookie either, the request carries nothing to abuse: the route asks for
  // credentials (the API answers 401).
  if (headers.has("Authorization") && !headers.has("Cookie") && (origin === null || origin === appOrigin))
    return { ok: true, via: "bearer-token" };
  if (new URL(request.url).pathname.startsWith("/api/") && !headers.has("Cookie") && origin === null)
    return { ok: true, via: "no-credentials" };
  if (origin !== null) {
    if (origin === appOrigin) return { ok: true, via: "origin" };
    return {
      ok: false,
      reason: `This request came from ${origin === "null" ? "a page with no origin" : `another site (${origin.slice(0, 200)})`}, so it was refused.`,
    };
  }
  const site = headers.get("Sec-Fetch-Site");
  if (site === "same-origin") return { ok: true, via: "fetch-metadata" };
  if (site !== null)
    return { ok: false, reason: `This request came from another site (Sec-Fetch-Site: ${site.slice(0, 40)}), so it was refused.` };
  return { ok: false, reason: "This request does not say which site sent it (no Origin header), so it was refused." };
}

/** The headers every response carries, static files included. */
export function commonSecurityHeaders(options: { https: boolean }): [string, string][] {
  const headers: [string, string][] = [
    ["X-Content-Type-Options", "nosniff"],
    // Same-origin: our own pages keep full referrers (and POSTs a real Origin); other sites learn nothing.
    ["Referrer-Policy", "same-origin"],
    ["X-Frame-Options", "DENY"],
    ["Cross-Origin-Opener-Policy", "same-origin"],
    ["Cross-Origin-Resource-Policy", "same-origin"],
    ["Permissions-Policy", "camera=(), microphone=(), geolocation=(), payment=(), usb=(), interest-cohort=()"],
  ];
  if (options.https) headers.push(["Strict-Transport-Security", "max-age=31536000; includeSubDomains"]);
  return headers;
}

/** The policy of everything that is not a page (JSON, files, redirects): it may load nothing and be framed by no one. */
export const RESOURCE_CSP = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

/**
 * The Content-Security-Policy of a page. Scripts: this origin's bundles and the framework's inline scripts that
 * carry this response's nonce, nothing else (no 'unsafe-inline', no eval). Styles: the built CSS file; `style`
 * attributes (sizes React sets on canvases and previews) are allowed, and `<style>` elements only with the nonce (the
 * code editors' themes, through CodeMirror's cspNonce). Workers may come
 * from this origin or a blob (the effect bench computes off the main thread); images also from data: and blob:
 * URLs (canvas snapshots), fonts also from data: URLs (the build inlines small ones). Forms post here, or to the sign-in provider (the OAuth start redirects there).
 */
export function documentCsp(options: { nonce: string; formTargets: string[]; https: boolean; development: boolean }): string {
  const { nonce, development } = options;
  const directives = [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'${development ? " 'unsafe-eval'" : ""}`,
    // Vite's development client injects CSS as <style> elements; the production build links one CSS file.
    development ? "style-src 'self' 'unsafe-inline'" : `style-src 'self' 'nonce-${nonce}'`,
    "style-src-attr 'unsafe-inline'",
    "img-src 'self' data: blob:",
    // The build inlines the smallest font subsets into the CSS as data: URLs.
    "font-src 'self' data:",
    development ? "connect-src 'self' ws: wss:" : "connect-src 'self'",
    "worker-src 'self' blob:",
    "object-src 'none'",
    "frame-src 'none'",
    "base-uri 'none'",
    `form-action 'self' ${options.formTargets.join(" ")}`.trim(),
    "frame-ancestors 'none'",
    "manifest-src 'self'",
  ];
  if (options.https) directives.push("upgrade-insecure-requests");
  return directives.join("; ");
}
