/**
 * The id of the running build (Next.js writes it to .next/BUILD_ID at build time; 'dev' without a
 * build). The rig page's service worker keys its cache by it, and the page compares it with the
 * server's to tell the operator that a newer version is deployed.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

let cached: string | null = null;

export function buildId(): string {
  if (cached !== null) return cached;
  try {
    cached = readFileSync(path.join(process.cwd(), '.next', 'BUILD_ID'), 'utf8').trim() || 'dev';
  } catch {
    cached = 'dev';
  }
  return cached;
}
