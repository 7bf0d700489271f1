import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { NEXT_MAX, safeNext, signInErrorMessage } from "./signin.server.ts";

/**
 * The check value is the WHATWG URL parser itself (Node's URL, the algorithm every current browser implements): a
 * return address is safe when a browser, resolving it against any page of the app, stays on the app's origin.
 */
const APP = "https://skewsmith.example";
const BASES = [`${APP}/auth/github/callback?code=x&state=y`, `${APP}/`, `${APP}/sign-in?next=%2F`];

function staysHome(path: string): boolean {
  return BASES.every((base) => new URL(path, base).origin === APP);
}

// Pieces a browser may read as a way off the origin (the usual open-redirect tricks, from common practice).
const DANGEROUS_PREFIXES = [
  "//",
  "/\\",
  "\\\\",
  "\\/",
  "/\t/",
  "/\n/",
  "/\r/",
  " //",
  "\t//",
  "///",
  "/%2F",
  "/%2f/",
  "/%5C",
  "/%5c/",
  "%2F%2F",
  "/%252F%252F",
  "/%09/",
  "/%0A/",
  "/%00",
  "https://evil.example",
  "http:evil.example",
  "//evil.example",
  "javascript:alert(1)",
  "data:text/html,x",
  "/\u3000/",
  "/\u2028/",
  "\u0000/",
  "/.//evil.example",
  "/a/..//evil.example",
  "/./\\evil.example",
  "/%2e%2e//evil.example",
  "/sign-in",
  "/auth/github",
  "/sign-out",
];
const HOSTS = ["evil.example", "evil.example:443", "user:pass@evil.example", "[::1]", "127.0.0.1", "xn--e1afmkfd.example"];
const controls = fc.integer({ min: 0, max: 0x1f }).map((c) => String.fromCharCode(c));
const c1 = fc.integer({ min: 0x7f, max: 0x9f }).map((c) => String.fromCharCode(c));
const encodedControl = fc.integer({ min: 0, max: 0x1f }).map((c) => `%${c.toString(16).padStart(2, "0")}`);
const anyText = fc.string({ unit: "binary", maxLength: 40 });
const pathText = fc.stringMatching(/^[a-zA-Z0-9/._~?&=#%-]{0,40}$/);

/** A hostile or ordinary return address, built from pieces. */
const candidate = fc.oneof(
  fc.tuple(fc.constantFrom(...DANGEROUS_PREFIXES), fc.constantFrom(...HOSTS, ""), pathText).map(([a, b, c]) => `${a}${b}${c}`),
  fc
    .tuple(pathText, fc.oneof(controls, c1, encodedControl, fc.constantFrom("\\", "%5C", "%2F%2F", "\u202e")), pathText)
    .map(([a, b, c]) => `/${a}${b}${c}`),
  fc.tuple(fc.constantFrom("/", "//", "/\\"), anyText).map(([a, b]) => `${a}${b}`),
  anyText,
  pathText.map((p) => `/${p}`),
  fc.nat({ max: 3 * NEXT_MAX }).map((n) => `/${"a".repeat(n)}`),
);

describe("safeNext (the return address after sign-in)", () => {
  it("only ever returns a path that every page of the app resolves to its own origin, short enough for a cookie", () => {
    fc.assert(
      fc.property(candidate, (value) => {
        const next = safeNext(value);
        expect(next.startsWith("/")).toBe(true);
        expect(next.length).toBeLessThanOrEqual(NEXT_MAX);
        expect(staysHome(next)).toBe(true);
        // Nothing a browser strips or re-reads survives, decoded or not.
        expect(next).not.toMatch(/[\u0000-\u0020\u007f-\u009f\\]/);
        expect(decodeURIComponent(next)).not.toMatch(/^[/\\]{2}|[\u0000-\u001f\\]/);
        // What is returned is already the browser's reading: accepting it again changes nothing.
        expect(safeNext(next)).toBe(next);
        const resolved = new URL(next, APP);
        expect(`${resolved.pathname}${resolved.search}${resolved.hash}`).toBe(next);
      }),
      { numRuns: 5000 },
    );
  });

  it("falls back to the home page for every classic trick", () => {
    for (const prefix of DANGEROUS_PREFIXES)
      for (const host of HOSTS) {
        const value = `${prefix}${host}/x`;
        const next = safeNext(value);
        // Some of these are ordinary paths on this origin ("/sign-in…" goes home too); none may leave it.
        expect(staysHome(next), value).toBe(true);
        if (!prefix.startsWith("/") || /^\/[\\/]|%2f|%5c|%0|%2e|[\t\n\r\u3000\u2028]/i.test(prefix)) expect(next, value).toBe("/");
      }
    for (const value of [null, undefined, 42, {}, ["/"], "", "/".repeat(2), `/${"x".repeat(NEXT_MAX)}`, "/%E0%A4%A", "/a%"])
      expect(safeNext(value), String(value)).toBe("/");
  });

  it("keeps an ordinary page with its query, and never leads back into signing in or out", () => {
    const project = "/projects/6f1c2a9e-1b2c-4d3e-8f90-123456789abc";
    expect(safeNext(project)).toBe(project);
    expect(safeNext("/teams/abc?sort=effects&dir=desc")).toBe("/teams/abc?sort=effects&dir=desc");
    expect(safeNext("/dev/mailbox#messages")).toBe("/dev/mailbox#messages");
    expect(safeNext("/projects/./x/../y")).toBe("/projects/y");
    for (const loop of ["/sign-in", "/sign-in?next=/x", "/SIGN-OUT", "/auth/github/callback?code=1", "/auth"])
      expect(safeNext(loop)).toBe("/");
    expect(safeNext("/sign-in-help")).toBe("/sign-in-help");
  });
});

describe("signInErrorMessage", () => {
  it("answers any code from the query string with text, never with something from Object's prototype", () => {
    for (const code of ["constructor", "__proto__", "toString", "hasOwnProperty", "valueOf", "nonsense"])
      expect(signInErrorMessage(code)).toMatch(/^GitHub did not confirm the sign-in/);
    expect(signInErrorMessage("denied")).toMatch(/cancelled at GitHub/);
  });
});
