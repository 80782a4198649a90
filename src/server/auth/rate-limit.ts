/**
 * Rate limits, kept in memory per server process: with several app servers each counts on its own, so
 * the effective limit is the per-server limit times the number of servers (good enough against
 * password guessing and runaway scripts; a shared store would be needed for an exact global limit).
 *
 *  - sign-in: at most SALTUS_LOGIN_MAX_FAILURES failed attempts (default 5) per account and per client
 *    address within SALTUS_LOGIN_WINDOW_MINUTES (default 15); then 429 with Retry-After.
 *  - heavy computations (design search, analyses, proposals, jobs): a token bucket per principal holding
 *    SALTUS_HEAVY_BURST requests (default 10), refilled at SALTUS_HEAVY_PER_MINUTE (default 30).
 * Limits are read from the environment on each check, so tests and the load script can raise them.
 */

const envNumber = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? v : fallback;
};

export interface Limited {
  retryAfterSeconds: number;
}

const failures = new Map<string, number[]>();

function loginLimits() {
  return { max: envNumber('SALTUS_LOGIN_MAX_FAILURES', 5), windowMs: envNumber('SALTUS_LOGIN_WINDOW_MINUTES', 15) * 60_000 };
}

function recent(key: string, now: number, windowMs: number): number[] {
  const list = (failures.get(key) ?? []).filter((t) => now - t < windowMs);
  if (list.length) failures.set(key, list);
  else failures.delete(key);
  return list;
}

/** Null when a sign-in attempt may go ahead; otherwise how long to wait. */
export function loginBlocked(keys: string[], now = Date.now()): Limited | null {
  const { max, windowMs } = loginLimits();
  let wait = 0;
  for (const key of keys) {
    const list = recent(key, now, windowMs);
    if (list.length >= max) wait = Math.max(wait, list[list.length - max]! + windowMs - now);
  }
  return wait > 0 ? { retryAfterSeconds: Math.max(1, Math.ceil(wait / 1000)) } : null;
}

export function recordLoginFailure(keys: string[], now = Date.now()): void {
  const { windowMs } = loginLimits();
  for (const key of keys) failures.set(key, [...recent(key, now, windowMs), now]);
  if (failures.size > 100_000) failures.clear(); // bounded memory under a flood of made-up names
}

export function clearLoginFailures(key: string): void {
  failures.delete(key);
}

const buckets = new Map<string, { tokens: number; at: number }>();

/** Takes one request from the principal's bucket; null when allowed. */
export function takeHeavy(principal: string, now = Date.now()): Limited | null {
  const burst = envNumber('SALTUS_HEAVY_BURST', 10);
  const perMs = envNumber('SALTUS_HEAVY_PER_MINUTE', 30) / 60_000;
  const b = buckets.get(principal) ?? { tokens: burst, at: now };
  b.tokens = Math.min(burst, b.tokens + (now - b.at) * perMs);
  b.at = now;
  if (b.tokens < 1) {
    buckets.set(principal, b);
    return { retryAfterSeconds: Math.max(1, Math.ceil((1 - b.tokens) / perMs / 1000)) };
  }
  b.tokens -= 1;
  buckets.set(principal, b);
  if (buckets.size > 100_000) buckets.clear();
  return null;
}

/** Forget every count (tests). */
export function resetRateLimits(): void {
  failures.clear();
  buckets.clear();
}
