import { describe, expect, it } from "vitest";
import { newRequestId, randomText } from "./requestContext.server.ts";

describe("request ids and nonces", () => {
  it("are 16 bytes of base64url and never repeat, across refills of the pool", () => {
    const ids = Array.from({ length: 2000 }, () => newRequestId());
    for (const id of ids) expect(id).toMatch(/^[A-Za-z0-9_-]{22}$/);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it("draw fresh bytes every time: no byte block is handed out twice", () => {
    // 16 random bytes repeating by chance is 2^-128 per pair; a pool handing out a block again would repeat at once.
    const seen = new Set<string>();
    for (let i = 0; i < 1000; i++) {
      const text = randomText(16, "base64");
      expect(Buffer.from(text, "base64")).toHaveLength(16);
      expect(seen.has(text)).toBe(false);
      seen.add(text);
    }
  });

  it("refuse a size outside 1 to 64 bytes, naming it", () => {
    expect(() => randomText(0, "base64")).toThrow(/bytes must be a whole number from 1 to 64, not 0/);
    expect(() => randomText(65, "base64url")).toThrow(/not 65/);
    expect(() => randomText(2.5, "base64url")).toThrow(/not 2.5/);
  });
});
