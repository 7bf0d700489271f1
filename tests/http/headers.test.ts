/**
 * Security headers on every kind of answer: pages (with the per-response nonce of their scripts), the data
 * requests of the app's scripts, resource routes (files, documents), static assets, refusals and errors.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { readdirSync } from "node:fs";
import path from "node:path";
import { createDb } from "../../app/db/client.server.ts";
import { buildDir } from "../support/appServer.ts";
import { client } from "../support/http.ts";
import { makeWorld, type World } from "../support/world.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let world: World;
beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
});
afterAll(() => db.$client.end());

function expectCommon(response: Response, what: string) {
  const h = response.headers;
  expect(h.get("X-Content-Type-Options"), what).toBe("nosniff");
  expect(h.get("Referrer-Policy"), what).toBe("same-origin");
  expect(h.get("X-Frame-Options"), what).toBe("DENY");
  expect(h.get("Cross-Origin-Opener-Policy"), what).toBe("same-origin");
  expect(h.get("X-Request-Id"), what).toMatch(/^[A-Za-z0-9_-]{22}$/);
}

function directives(csp: string | null): Map<string, string> {
  return new Map((csp ?? "").split(/;\s*/).map((d) => [d.split(" ")[0], d.split(" ").slice(1).join(" ")]));
}

describe("pages", () => {
  it("carry a policy whose nonce is fresh per response and on every inline script, and are never cached", async () => {
    const pages = ["/", `/teams/${world.team.id}`, `/projects/${world.project.id}`, `/effects/${world.effect.id}`];
    const nonces = new Set<string>();
    for (const page of pages) {
      const response = await world.as.owner.fetch(page);
      expect(response.status, page).toBe(200);
      expectCommon(response, page);
      expect(response.headers.get("Cache-Control"), page).toBe("private, no-store");
      const csp = directives(response.headers.get("Content-Security-Policy"));
      expect(csp.get("frame-ancestors")).toBe("'none'");
      expect(csp.get("object-src")).toBe("'none'");
      const nonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(csp.get("script-src") ?? "")?.[1];
      expect(nonce, page).toBeTruthy();
      expect(csp.get("script-src")).not.toMatch(/unsafe-inline|unsafe-eval/);
      nonces.add(nonce!);
      const html = await response.text();
      const scripts = [...html.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]);
      expect(scripts.length, page).toBeGreaterThan(1);
      for (const attributes of scripts) expect(attributes, `${page}: a script without this response's nonce`).toContain(`nonce="${nonce}"`);
      // No inline event handlers or javascript: URLs, which no nonce could allow.
      expect(html).not.toMatch(/\son[a-z]+="|javascript:/i);
    }
    expect(nonces.size).toBe(pages.length);
  });

  it("the sign-in page too, and its form may lead to the sign-in provider", async () => {
    const response = await fetch(`${inject("appUrl")}/sign-in`);
    expectCommon(response, "sign-in");
    expect(directives(response.headers.get("Content-Security-Policy")).get("form-action")).toBe(
      `'self' ${new URL(inject("githubUrl")).origin}`,
    );
  });
});

describe("everything else", () => {
  it("data requests, files, documents, health, 404s and refusals carry the headers and may load nothing", async () => {
    const answers: [string, Response][] = [
      ["data request", await world.as.owner.fetch(`/projects/${world.project.id}.data`)],
      ["effect document", await world.as.owner.fetch(`/effects/${world.effect.id}/document.json`)],
      ["sprite image", await world.as.owner.fetch(`/sprites/${world.sprite.id}/image.png`)],
      ["health", await fetch(`${inject("appUrl")}/healthz`)],
      ["unknown page", await world.as.owner.fetch("/no/such/page")],
      ["unknown sprite", await world.as.owner.fetch("/sprites/00000000-0000-4000-8000-000000000000/image.png")],
      ["refusal", await world.as.owner.post("/sign-out", {}, { origin: "https://evil.example" })],
      ["redirect", await client(inject("appUrl")).fetch("/")],
    ];
    for (const [what, response] of answers) {
      expectCommon(response, what);
      const csp = directives(response.headers.get("Content-Security-Policy"));
      expect(csp.get("frame-ancestors"), what).toBe("'none'");
      if (what !== "unknown page") expect(csp.get("default-src"), what).toBe("'none'");
    }
    const cache = new Map(answers.map(([what, r]) => [what, r.headers.get("Cache-Control")]));
    expect(cache.get("data request")).toBe("private, no-store");
    expect(cache.get("effect document")).toBe("private, no-store");
    expect(cache.get("sprite image")).toMatch(/^private/);
  });

  it("static files carry nosniff and the request id; hashed assets are cached for good", async () => {
    const assets = readdirSync(path.join(buildDir(), "client/assets")).filter((f) => f.endsWith(".js"));
    const asset = await fetch(`${inject("appUrl")}/assets/${assets[0]}`);
    expect(asset.status).toBe(200);
    expectCommon(asset, "asset");
    expect(asset.headers.get("Cache-Control")).toMatch(/immutable/);
    const icon = await fetch(`${inject("appUrl")}/favicon.svg`);
    expect(icon.status).toBe(200);
    expectCommon(icon, "favicon");
    const missing = await fetch(`${inject("appUrl")}/assets/nope-123.js`);
    expect(missing.status).toBe(404);
    expect(missing.headers.get("X-Content-Type-Options")).toBe("nosniff");
  });
});

describe("query parameters used as keys", () => {
  it("never reach an object's prototype: prototype names are just unknown values", async () => {
    for (const code of ["constructor", "__proto__", "toString", "hasOwnProperty"]) {
      const response = await fetch(`${inject("appUrl")}/sign-in?error=${code}`);
      expect(response.status, code).toBe(200);
      expect(await response.text()).toContain("GitHub did not confirm the sign-in");
    }
    for (const [sort, dir] of [
      ["__proto__", "constructor"],
      ["constructor", "__proto__"],
      ["toString", "valueOf"],
    ]) {
      const response = await world.as.owner.fetch(`/teams/${world.team.id}?sort=${sort}&dir=${dir}`);
      expect(response.status, sort).toBe(200);
    }
  });
});
