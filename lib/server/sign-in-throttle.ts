import "server-only";

/**
 * Sign-in throttling (OWASP ASVS 4.0 §2.2.1), per account and per client address, with delays
 * that grow with each failure: after the free attempts, each further attempt must wait 1, 2, 4 …
 * seconds after the last failure. The per-account wait stops growing at 30 s, so an attacker who
 * keeps guessing at a real user's account can slow that user down but not lock them out; the
 * per-address wait grows to 15 minutes, which stops one machine guessing at many accounts.
 * Failures are forgotten 15 minutes after the last one, and an account's count is cleared by a
 * successful sign-in.
 *
 * The state is kept in memory, not in the database: heatcheck runs as one server process (like
 * its analysis queue), so one map sees every attempt; failed attempts then cost no database write
 * (SQLite has one writer, shared with uploads); and a restart, which only the operator can cause,
 * forgets the counts, which errs on the side of letting real users in.
 */

interface Counter {
  failures: number;
  lastFailureAt: number;
}

export interface ThrottleRule {
  free: number;
  maxDelayMs: number;
}

export const ACCOUNT_RULE: ThrottleRule = { free: 5, maxDelayMs: 30_000 };
export const ADDRESS_RULE: ThrottleRule = { free: 20, maxDelayMs: 15 * 60_000 };
const FORGET_AFTER_MS = 15 * 60_000;
const MAX_KEYS = 50_000;

const globalForThrottle = globalThis as unknown as {
  heatcheckSignInThrottle?: Map<string, Counter>;
};
const counters = (globalForThrottle.heatcheckSignInThrottle ??= new Map<string, Counter>());

/** Milliseconds the key must still wait before its next attempt (0: it may try now). */
export function waitMs(key: string, rule: ThrottleRule, now = Date.now()): number {
  const c = counters.get(key);
  if (!c) return 0;
  if (now - c.lastFailureAt > FORGET_AFTER_MS) {
    counters.delete(key);
    return 0;
  }
  if (c.failures < rule.free) return 0;
  const delay = Math.min(rule.maxDelayMs, 1000 * 2 ** (c.failures - rule.free));
  return Math.max(0, c.lastFailureAt + delay - now);
}

export function recordFailure(key: string, now = Date.now()): void {
  if (counters.size >= MAX_KEYS) {
    for (const [k, c] of counters) if (now - c.lastFailureAt > FORGET_AFTER_MS) counters.delete(k);
  }
  const c = counters.get(key);
  if (c && now - c.lastFailureAt <= FORGET_AFTER_MS) {
    c.failures += 1;
    c.lastFailureAt = now;
  } else {
    counters.set(key, { failures: 1, lastFailureAt: now });
  }
}

export function clearFailures(key: string): void {
  counters.delete(key);
}

/** The message shown when an attempt must wait, rounded up to whole seconds. */
export function throttleMessage(ms: number): string {
  const s = Math.ceil(ms / 1000);
  const wait = s >= 90 ? `${Math.ceil(s / 60)} minutes` : `${s} second${s === 1 ? "" : "s"}`;
  return `Too many sign-in attempts: wait ${wait}, then try again.`;
}
