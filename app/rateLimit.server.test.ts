import { describe, expect, it } from "vitest";
import { createRateLimiter, enforce, parseRateLimit } from "./rateLimit.server.ts";

describe("parseRateLimit", () => {
  it('reads "count/seconds" and refuses anything else', () => {
    expect(parseRateLimit("20/300")).toEqual({ limit: 20, windowSeconds: 300 });
    expect(parseRateLimit(" 5 / 60s ")).toEqual({ limit: 5, windowSeconds: 60 });
    for (const bad of ["", "20", "0/60", "5/0", "-1/60", "1e3/60", "five/60", "20/300/1"]) expect(parseRateLimit(bad), bad).toBeNull();
  });
});

describe("createRateLimiter (a token bucket per key)", () => {
  it("allows a burst of `limit`, then refuses with the wait until one request is free, and refills evenly", () => {
    let now = 0;
    const limiter = createRateLimiter({ limit: 3, windowSeconds: 60, now: () => now });
    expect([limiter.take("a"), limiter.take("a"), limiter.take("a")].map((v) => v.ok)).toEqual([true, true, true]);
    // 3 per 60 s refills one every 20 s.
    expect(limiter.take("a")).toEqual({ ok: false, retryAfterSeconds: 20 });
    expect(limiter.take("b").ok).toBe(true); // keys are independent
    now = 19_000;
    expect(limiter.take("a")).toMatchObject({ ok: false, retryAfterSeconds: 1 });
    now = 20_000;
    expect(limiter.take("a").ok).toBe(true);
    expect(limiter.take("a").ok).toBe(false);
    now = 10 * 60_000; // a long pause refills to the burst, never beyond it
    expect([1, 2, 3, 4].map(() => limiter.take("a").ok)).toEqual([true, true, true, false]);
  });

  it("keeps at most maxKeys keys, forgetting the least recently seen first", () => {
    const limiter = createRateLimiter({ limit: 1, windowSeconds: 3600, maxKeys: 100, now: () => 0 });
    for (let i = 0; i < 10_000; i++) limiter.take(`client-${i}`);
    expect(limiter.size()).toBe(100);
    expect(limiter.take("client-9999").ok).toBe(false); // recent: still remembered
    expect(limiter.take("client-0").ok).toBe(true); // long gone: a fresh bucket
  });
});

describe("enforce", () => {
  it("throws a 429 with Retry-After and a message saying how long to wait", () => {
    const limiter = createRateLimiter({ limit: 1, windowSeconds: 30, now: () => 0 });
    enforce(limiter, "k", "sign-in attempts");
    try {
      enforce(limiter, "k", "sign-in attempts");
      throw new Error("expected a refusal");
    } catch (thrown) {
      const t = thrown as { init: { status: number; headers: Record<string, string> }; data: { message: string } };
      expect(t.init.status).toBe(429);
      expect(t.init.headers["Retry-After"]).toBe("30");
      expect(t.data.message).toBe("Too many sign-in attempts from here in a short time. Wait 30 seconds and try again.");
    }
  });
});
