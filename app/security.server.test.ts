import { describe, expect, it } from "vitest";
import { checkOrigin, commonSecurityHeaders, documentCsp } from "./security.server.ts";

const APP = "https://skewsmith.example";
const post = (headers: Record<string, string>, method = "POST") => new Request(`${APP}/projects/x`, { method, headers });

describe("checkOrigin", () => {
  it("lets safe methods through whatever they say", () => {
    for (const method of ["GET", "HEAD", "OPTIONS"])
      expect(checkOrigin(post({ Origin: "https://evil.example" }, method), APP).ok).toBe(true);
  });

  it("takes a state-changing request only from the app's own origin", () => {
    expect(checkOrigin(post({ Origin: APP, Cookie: "s=1" }), APP)).toEqual({ ok: true, via: "origin" });
    for (const origin of [
      "https://evil.example",
      "null",
      "http://skewsmith.example",
      "https://skewsmith.example:8443",
      `${APP}.evil.example`,
    ])
      expect(checkOrigin(post({ Origin: origin, Cookie: "s=1" }), APP).ok, origin).toBe(false);
    for (const method of ["PUT", "PATCH", "DELETE"])
      expect(checkOrigin(post({ Origin: "https://evil.example" }, method), APP).ok).toBe(false);
  });

  it("falls back to Sec-Fetch-Site when there is no Origin, and refuses a request that says neither", () => {
    expect(checkOrigin(post({ "Sec-Fetch-Site": "same-origin", Cookie: "s=1" }), APP)).toEqual({ ok: true, via: "fetch-metadata" });
    for (const site of ["cross-site", "same-site", "none"]) expect(checkOrigin(post({ "Sec-Fetch-Site": site }), APP).ok).toBe(false);
    const bare = checkOrigin(post({ Cookie: "s=1" }), APP);
    expect(bare).toEqual({ ok: false, reason: "This request does not say which site sent it (no Origin header), so it was refused." });
    // Origin wins over Sec-Fetch-Site when both are sent.
    expect(checkOrigin(post({ Origin: "https://evil.example", "Sec-Fetch-Site": "same-origin" }), APP).ok).toBe(false);
  });

  it("lets an API call with no credentials at all through to be answered 401, but never a page's", async () => {
    const api = new Request(`${APP}/api/v1/tokens`, { method: "POST" });
    expect(checkOrigin(api, APP)).toEqual({ ok: true, via: "no-credentials" });
    expect(checkOrigin(new Request(`${APP}/auth/github`, { method: "POST" }), APP).ok).toBe(false);
    expect(checkOrigin(new Request(`${APP}/api/v1/tokens`, { method: "POST", headers: { Cookie: "s=1" } }), APP).ok).toBe(false);
  });

  it("exempts a bearer token without cookies (no ambient credential a browser could be tricked into sending)", () => {
    expect(checkOrigin(post({ Authorization: "Bearer sk_abc" }), APP)).toEqual({ ok: true, via: "bearer-token" });
    expect(checkOrigin(post({ Authorization: "Bearer sk_abc", Cookie: "s=1" }), APP).ok).toBe(false);
    // A malformed Authorization header is the route's to refuse (401): no browser sends one cross-site either.
    expect(checkOrigin(post({ Authorization: "Basic dTpw" }), APP).ok).toBe(true);
    expect(checkOrigin(post({ Authorization: "Basic dTpw", Cookie: "s=1" }), APP).ok).toBe(false);
    // A browser page elsewhere that holds a token is still another site.
    expect(checkOrigin(post({ Authorization: "Bearer sk_abc", Origin: "https://evil.example" }), APP).ok).toBe(false);
    expect(checkOrigin(post({ Authorization: "Bearer sk_abc", Origin: APP }), APP).ok).toBe(true);
  });
});

describe("the page policy", () => {
  it("allows scripts only from the app and with this response's nonce, and framing by no one", () => {
    const csp = documentCsp({ nonce: "abc123", formTargets: ["https://github.com"], https: true, development: false });
    const directives = new Map(csp.split("; ").map((d) => [d.split(" ")[0], d.split(" ").slice(1).join(" ")]));
    expect(directives.get("script-src")).toBe("'self' 'nonce-abc123'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline|unsafe-eval/);
    expect(directives.get("style-src")).toBe("'self' 'nonce-abc123'");
    expect(directives.get("frame-ancestors")).toBe("'none'");
    expect(directives.get("worker-src")).toBe("'self' blob:");
    expect(directives.get("form-action")).toBe("'self' https://github.com");
    expect(directives.get("object-src")).toBe("'none'");
    expect(directives.get("base-uri")).toBe("'none'");
    expect(directives.has("upgrade-insecure-requests")).toBe(true);
  });

  it("sends nosniff, a referrer policy and framing refusal everywhere, and HSTS only over https", () => {
    const names = (https: boolean) => new Map(commonSecurityHeaders({ https }));
    expect(names(false).get("X-Content-Type-Options")).toBe("nosniff");
    expect(names(false).get("Referrer-Policy")).toBe("same-origin");
    expect(names(false).get("X-Frame-Options")).toBe("DENY");
    expect(names(false).has("Strict-Transport-Security")).toBe(false);
    expect(names(true).get("Strict-Transport-Security")).toMatch(/^max-age=31536000/);
  });
});
