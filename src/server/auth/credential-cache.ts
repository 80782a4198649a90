/**
 * A short in-memory cache of accepted credentials (keyed by the SHA-256 of the token or session
 * secret), so the rig log's hot path does not pay a database lookup on every request. Entries live
 * SALTUS_AUTH_CACHE_MS (default 10 s) and never past the credential's own expiry. Revoking a token,
 * disabling an account or signing out clears this process's cache at once; on other app servers (and
 * after a change made with the CLI) the change takes effect within that time — the revocation delay.
 */
import type { Principal } from './sessions';

interface Entry {
  principal: Principal;
  id: string;
  at: number;
  expiresAt: number | null;
}

const entries = new Map<string, Entry>();
const ttl = () => {
  const v = Number(process.env.SALTUS_AUTH_CACHE_MS ?? 10_000);
  return Number.isFinite(v) && v >= 0 ? v : 10_000;
};

export function cachedCredential(hash: string, now: number): Entry | null {
  const e = entries.get(hash);
  if (!e) return null;
  if (now - e.at >= ttl() || (e.expiresAt !== null && e.expiresAt <= now)) {
    entries.delete(hash);
    return null;
  }
  return e;
}

export function rememberCredential(hash: string, id: string, principal: Principal, expiresAt: Date | null, now: number): void {
  if (ttl() === 0) return;
  if (entries.size > 10_000) entries.clear();
  entries.set(hash, { principal, id, at: now, expiresAt: expiresAt?.getTime() ?? null });
}

/** Forget every accepted credential (after a revocation, a disabled account, a sign-out). */
export function forgetCredentials(): void {
  entries.clear();
}
