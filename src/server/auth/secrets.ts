/** Random secrets and their digests: the database keeps only SHA-256 of a cookie or token secret. */
import { createHash, createHmac, randomBytes, timingSafeEqual } from 'node:crypto';

export const randomSecret = (bytes = 32) => randomBytes(bytes).toString('base64url');

export const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

/** The CSRF value bound to a session: HMAC-SHA256 of a fixed label keyed by the session secret. */
export const csrfFor = (sessionSecret: string) => createHmac('sha256', sessionSecret).update('saltus-csrf-v1').digest('base64url');

export function safeEqual(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}
