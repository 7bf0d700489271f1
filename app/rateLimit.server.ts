/**
 * Rate limits: how often one client (an address, a token, a person) may do something, in this server process.
 * Each limiter is a token bucket per key: `limit` requests at once, refilled evenly over `windowSeconds`. Keys are
 * kept in a bounded map (the least recently seen go first), so a flood of new keys costs bounded memory.
 *
 * Routes call the named helpers at their top, before any work:
 *   await limitSignIn(request)                 sign-in start and callback, per client address
 *   await limitInvitation(request)             accepting an invitation (/invitations/:token), per client address
 *   await limitApiToken(tokenId)               a token-authenticated API call, per token
 * Each throws a 429 (with Retry-After and a message saying when to try again) when the key is over its limit.
 * Limits come from the environment (RATE_LIMIT_SIGN_IN, RATE_LIMIT_INVITATIONS, RATE_LIMIT_API as "count/seconds").
 * The counts live in memory: with several server processes each keeps its own (a shared store is for later).
 */
import { data } from "react-router";
import { env } from "./env.server.ts";
import { currentRequest } from "./requestContext.server.ts";

export interface RateLimit {
  /** Requests allowed at once (the bucket's size). */
  limit: number;
  /** Seconds over which a full bucket refills. */
  windowSeconds: number;
}

/** Parses "count/seconds" (say "20/300"): at most `count` requests at once, refilled over `seconds`. */
export function parseRateLimit(text: string): RateLimit | null {
  const match = /^\s*(\d{1,9})\s*\/\s*(\d{1,9})\s*s?\s*$/.exec(text);
  if (!match) return null;
  const limit = Number(match[1]);
  const windowSeconds = Number(match[2]);
  return limit >= 1 && windowSeconds >= 1 ? { limit, windowSeconds } : null;
}

export type Verdict = { ok: true; remaining: number } | { ok: false; retryAfterSeconds: number };

/** A token-bucket limiter over string keys. `now` is injectable for tests. */
export function createRateLimiter(options: RateLimit & { maxKeys?: number; now?: () => number }) {
  const { limit, windowSeconds } = options;
  const maxKeys = options.maxKeys ?? 50_000;
  const now = options.now ?? (() => Date.now());
  const refillPerMs = limit / (windowSeconds * 1000);
  const buckets = new Map<string, { tokens: number; at: number }>();
  return {
    /** Takes one request from `key`'s bucket, or says how long until one is free. */
    take(key: string): Verdict {
      const t = now();
      const previous = buckets.get(key);
      let tokens = previous ? Math.min(limit, previous.tokens + (t - previous.at) * refillPerMs) : limit;
      if (previous)
        buckets.delete(key); // re-inserted below: the map's order is then least recently seen first
      else if (buckets.size >= maxKeys) buckets.delete(buckets.keys().next().value!);
      if (tokens < 1) {
        buckets.set(key, { tokens, at: t });
        return { ok: false, retryAfterSeconds: Math.max(1, Math.ceil((1 - tokens) / refillPerMs / 1000)) };
      }
      tokens -= 1;
      buckets.set(key, { tokens, at: t });
      return { ok: true, remaining: Math.floor(tokens) };
    },
    /** How many keys are tracked (tests). */
    size: () => buckets.size,
    reset: () => buckets.clear(),
  };
}
export type RateLimiter = ReturnType<typeof createRateLimiter>;

/** Throws a 429 when `key` is over `limiter`'s limit; `what` says what was limited, in the message. */
export function enforce(limiter: RateLimiter, key: string, what: string): void {
  const verdict = limiter.take(key);
  if (verdict.ok) return;
  const wait = verdict.retryAfterSeconds;
  throw data(
    {
      message: `Too many ${what} from here in a short time. Wait ${wait === 1 ? "a second" : `${wait} seconds`} and try again.`,
      retryAfterSeconds: wait,
    },
    { status: 429, headers: { "Retry-After": String(wait) } },
  );
}

/** The client's address as the server saw it (see TRUST_PROXY), or "unknown" outside the server. */
export function clientKey(_request?: Request): string {
  return currentRequest()?.clientAddress ?? "unknown";
}

const limiters = new Map<string, RateLimiter>();
function named(name: "signIn" | "invitations" | "api"): RateLimiter {
  let limiter = limiters.get(name);
  if (!limiter) {
    const config = env().rateLimits[name];
    limiter = createRateLimiter(config);
    limiters.set(name, limiter);
  }
  return limiter;
}

/** Sign-in (the OAuth start and the callback), per client address. */
export async function limitSignIn(request: Request): Promise<void> {
  enforce(named("signIn"), clientKey(request), "sign-in attempts");
}

/** Accepting an invitation, per client address (a token is long and random; this stops guessing floods anyway). */
export async function limitInvitation(request: Request): Promise<void> {
  enforce(named("invitations"), clientKey(request), "invitation attempts");
}

/** A token-authenticated API call, per token (its id, or its hash; never the token itself). */
export async function limitApiToken(tokenKey: string): Promise<void> {
  enforce(named("api"), tokenKey, "API calls with this token");
}
