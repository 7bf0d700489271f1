import { isRouteErrorResponse } from "react-router";
import { describe, expect, it } from "vitest";
import { formText, JSON_MAX_DEPTH, nestingDepth, readForm, readJson } from "./http.server.ts";

/** What a thrown `data(…)` carries: its status and message. */
async function refusal(work: Promise<unknown>): Promise<{ status: number; message: string }> {
  try {
    await work;
  } catch (thrown) {
    const t = thrown as { init?: { status?: number }; data?: { message?: string } };
    if (isRouteErrorResponse(thrown)) return { status: thrown.status, message: String(thrown.data?.message) };
    return { status: t.init?.status ?? -1, message: String(t.data?.message) };
  }
  throw new Error("expected a refusal");
}

const post = (body: BodyInit | null, type?: string, headers: Record<string, string> = {}) =>
  new Request("http://app.test/x", { method: "POST", body, headers: { ...(type ? { "Content-Type": type } : {}), ...headers } });

describe("readForm", () => {
  it("reads url-encoded and multipart forms", async () => {
    expect((await readForm(post("a=1&b=two", "application/x-www-form-urlencoded"))).get("b")).toBe("two");
    const multipart = new FormData();
    multipart.set("name", "emblem");
    multipart.set("file", new Blob([new Uint8Array([1, 2, 3])]), "x.png");
    const read = await readForm(new Request("http://app.test/x", { method: "POST", body: multipart }));
    expect(read.get("name")).toBe("emblem");
    expect((read.get("file") as File).size).toBe(3);
  });

  it("refuses JSON, text and a missing Content-Type with 415, naming what came", async () => {
    expect(await refusal(readForm(post('{"a":1}', "application/json")))).toMatchObject({
      status: 415,
      message: expect.stringContaining("application/json"),
    });
    expect((await refusal(readForm(post("hello", "text/plain")))).status).toBe(415);
    expect((await refusal(readForm(post("a=1")))).status).toBe(415);
  });

  it("refuses broken multipart with 400 and an oversized body with 413", async () => {
    expect((await refusal(readForm(post("--x\r\nbroken", "multipart/form-data; boundary=x")))).status).toBe(400);
    expect((await refusal(readForm(post("--x\r\nbroken", "multipart/form-data")))).status).toBe(400);
    expect((await refusal(readForm(post("a=" + "z".repeat(2000), "application/x-www-form-urlencoded"), { maxBytes: 1000 }))).status).toBe(
      413,
    );
    // A body larger than its Content-Length claims is still cut off at the limit.
    const stream = new ReadableStream({
      pull(controller) {
        controller.enqueue(new TextEncoder().encode("a=" + "z".repeat(600)));
      },
    });
    const lying = new Request("http://app.test/x", {
      method: "POST",
      body: stream,
      headers: { "Content-Type": "application/x-www-form-urlencoded" },
      duplex: "half",
    } as RequestInit);
    expect((await refusal(readForm(lying, { maxBytes: 1000 }))).status).toBe(413);
  });
});

describe("readJson", () => {
  it("parses JSON and refuses other types (415), bad JSON and bad UTF-8 (400)", async () => {
    expect(await readJson(post('{"a":[1,2]}', "application/json; charset=utf-8"))).toEqual({ a: [1, 2] });
    expect((await refusal(readJson(post("a=1", "application/x-www-form-urlencoded")))).status).toBe(415);
    expect((await refusal(readJson(post("{", "application/json")))).status).toBe(400);
    expect((await refusal(readJson(post(new Uint8Array([0x7b, 0xff, 0x7d]), "application/json")))).status).toBe(400);
  });

  it("refuses JSON nested deeper than the limit before parsing it, naming the limit (400)", async () => {
    const nested = (n: number) => `${"[".repeat(n)}${"]".repeat(n)}`;
    expect(await readJson(post(nested(JSON_MAX_DEPTH), "application/json"))).toBeInstanceOf(Array);
    const refused = await refusal(readJson(post(nested(100_000), "application/json")));
    expect(refused.status).toBe(400);
    expect(refused.message).toContain(`at most ${JSON_MAX_DEPTH}`);
    expect((await refusal(readJson(post(`{"a":${nested(JSON_MAX_DEPTH)}}`, "application/json")))).status).toBe(400);
  });

  it("counts nesting outside strings only", () => {
    // Brackets inside strings, escaped quotes included, are text (RFC 8259 §7: a string is quoted, \" escapes a quote).
    expect(nestingDepth('{"a":"[[[[\\"[[","b":[{"c":"}]"}]}')).toBe(3);
    expect(nestingDepth('"[[["')).toBe(0);
    expect(nestingDepth("[[],[[]]]")).toBe(3);
  });
});

describe("formText", () => {
  it("gives the first value, '' when missing, and refuses a file in a text field", async () => {
    const form = new FormData();
    form.append("a", "1");
    form.append("a", "2");
    form.set("f", new Blob(["x"]), "f.txt");
    expect(formText(form, "a")).toBe("1");
    expect(formText(form, "missing")).toBe("");
    expect((await refusal(Promise.resolve().then(() => formText(form, "f")))).status).toBe(400);
  });
});
