import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startFakeGitHub, type FakeGitHub } from "./oauth.ts";

let fake: FakeGitHub;
beforeAll(async () => {
  fake = await startFakeGitHub({ clientId: "cid", clientSecret: "csecret" });
});
afterAll(() => fake.close());

const basic = (id: string, secret: string) => `Basic ${Buffer.from(`${id}:${secret}`).toString("base64")}`;

async function codeFor(login: string, redirect = "http://127.0.0.1:3000/auth/github/callback") {
  const body = new URLSearchParams({ client_id: "cid", redirect_uri: redirect, state: "st", login });
  const response = await fetch(`${fake.url}/login/oauth/authorize`, { method: "POST", body, redirect: "manual" });
  return new URL(response.headers.get("Location")!).searchParams.get("code")!;
}

const exchange = (code: string, auth = basic("cid", "csecret"), redirect = "http://127.0.0.1:3000/auth/github/callback") =>
  fetch(`${fake.url}/login/oauth/access_token`, {
    method: "POST",
    headers: { Authorization: auth, Accept: "application/json" },
    body: new URLSearchParams({ grant_type: "authorization_code", code, redirect_uri: redirect }),
  });

describe("the local GitHub stand-in", () => {
  it("refuses an authorize request from an unknown client or without state", async () => {
    const unknown = await fetch(`${fake.url}/login/oauth/authorize?client_id=nope&redirect_uri=http://127.0.0.1/cb&state=x`);
    expect(unknown.status).toBe(400);
    expect(await unknown.text()).toContain("Unknown client_id");
    const noState = await fetch(`${fake.url}/login/oauth/authorize?client_id=cid&redirect_uri=http://127.0.0.1/cb`);
    expect(noState.status).toBe(400);
  });

  it("trades a code once for a token that reads the chosen account", async () => {
    const code = await codeFor("juno-pelloway");
    const response = await exchange(code);
    expect(response.status).toBe(200);
    const { access_token: token, token_type: type } = await response.json();
    expect(type).toBe("bearer");
    const user = await (await fetch(`${fake.apiUrl}/user`, { headers: { Authorization: `Bearer ${token}` } })).json();
    expect(user).toMatchObject({ login: "juno-pelloway", id: 7100003 });
    expect((await exchange(code)).status).toBe(400);
  });

  it("checks the client secret and the redirect URI at the token exchange", async () => {
    expect(await (await exchange(await codeFor("oren-saltmarsh"), basic("cid", "wrong"))).json()).toMatchObject({
      error: "invalid_client",
    });
    const mismatch = await exchange(await codeFor("oren-saltmarsh"), basic("cid", "csecret"), "http://127.0.0.1:3000/elsewhere");
    expect(await mismatch.json()).toMatchObject({ error: "redirect_uri_mismatch" });
  });

  it("answers the API only with a valid token", async () => {
    expect((await fetch(`${fake.apiUrl}/user`)).status).toBe(401);
    expect((await fetch(`${fake.apiUrl}/user`, { headers: { Authorization: "Bearer made-up" } })).status).toBe(401);
  });

  it("answers a browser's icon request with no content, and any other unknown path with 404", async () => {
    const icon = await fetch(`${fake.url}/favicon.ico`);
    expect(icon.status).toBe(204);
    expect((await fetch(`${fake.url}/no-such-page`)).status).toBe(404);
  });
});
