/**
 * THE permission table: method + route pattern → the least role that may call it. Every route handler
 * goes through the wrappers of src/server/api/http.ts, which look the request up here before the
 * handler runs. A route missing from this table is refused to everyone but an admin, and
 * test/integration/auth-matrix.test.ts fails until its line is added.
 *
 * `public` routes need no credentials (health check, signing in and out).
 */
import type { Role } from './roles';

export type Need = Role | 'public';

export const PERMISSIONS: Record<string, Need> = {
  'GET /api/health': 'public',
  'POST /api/auth/login': 'public',
  'POST /api/auth/logout': 'public',
  'GET /api/auth/me': 'viewer',

  'GET /api/v1/version': 'viewer',

  // stateless computations (heavy: also rate limited)
  'POST /api/v1/designs': 'planner',
  'POST /api/v1/analyses': 'planner',
  'POST /api/v1/suggestions': 'planner',
  'POST /api/v1/schedules': 'planner',
  'POST /api/v1/tracks/metrics': 'operator',

  // campaigns
  'GET /api/v1/campaigns': 'viewer',
  'POST /api/v1/campaigns': 'planner',
  'GET /api/v1/campaigns/[id]': 'viewer',
  'POST /api/v1/campaigns/[id]/designs': 'planner',
  'GET /api/v1/campaigns/[id]/runs': 'viewer',
  'POST /api/v1/campaigns/[id]/runs': 'planner',
  'POST /api/v1/campaigns/[id]/analyses': 'planner',
  'POST /api/v1/campaigns/[id]/next-trials': 'planner',
  'POST /api/v1/campaigns/[id]/suggestions': 'planner',
  'POST /api/v1/campaigns/[id]/suggestions/[suggestionId]/accept': 'planner',
  'POST /api/v1/campaigns/[id]/imports': 'planner',

  // schedule
  'GET /api/v1/campaigns/[id]/schedule': 'viewer',
  'POST /api/v1/campaigns/[id]/schedule': 'planner',
  'GET /api/v1/campaigns/[id]/schedule/week': 'viewer',
  'GET /api/v1/campaigns/[id]/schedule/day-sheet': 'viewer',
  'GET /api/v1/campaigns/[id]/schedule/calendar': 'viewer',
  'POST /api/v1/campaigns/[id]/schedule/move': 'planner',

  // long computations as jobs (submitting one is heavy: rate limited)
  'POST /api/v1/jobs': 'planner',
  'GET /api/v1/jobs': 'viewer',
  'GET /api/v1/jobs/[id]': 'viewer',
  'POST /api/v1/jobs/[id]/cancel': 'planner',

  // trials at the rig
  'GET /api/v1/campaigns/[id]/trials': 'viewer',
  'POST /api/v1/campaigns/[id]/trials': 'operator',
  'POST /api/v1/campaigns/[id]/trials/log': 'operator',
  'GET /api/v1/campaigns/[id]/trials/[trialId]': 'viewer',
  'POST /api/v1/campaigns/[id]/trials/[trialId]/finish': 'operator',
  'POST /api/v1/campaigns/[id]/trials/[trialId]/amendments': 'operator',
  'POST /api/v1/campaigns/[id]/trials/[trialId]/tracks': 'operator',

  // people and API tokens (the accounts page)
  'GET /api/v1/users': 'admin',
  'POST /api/v1/users': 'admin',
  'POST /api/v1/users/disable': 'admin',
  'GET /api/v1/tokens': 'admin',
  'POST /api/v1/tokens': 'admin',
  'POST /api/v1/tokens/revoke': 'admin',
};

interface Compiled {
  method: string;
  pattern: string;
  segments: string[];
  need: Need;
}

const compiled: Compiled[] = Object.entries(PERMISSIONS).map(([key, need]) => {
  const [method, pattern] = key.split(' ') as [string, string];
  return { method, pattern, segments: pattern.split('/').filter(Boolean), need };
});

const isParam = (s: string) => s.startsWith('[') && s.endsWith(']');

/**
 * The table entry for a request, matched as the router matches: a literal segment beats a [param]
 * at the same place. HEAD is looked up as GET. Null when the table has no entry.
 */
export function lookupPermission(method: string, pathname: string): { pattern: string; need: Need } | null {
  const m = method.toUpperCase() === 'HEAD' ? 'GET' : method.toUpperCase();
  const parts = pathname.split('/').filter(Boolean);
  let best: Compiled | null = null;
  let bestScore = '';
  for (const c of compiled) {
    if (c.method !== m || c.segments.length !== parts.length) continue;
    let score = '';
    let ok = true;
    for (let i = 0; i < parts.length; i++) {
      if (isParam(c.segments[i]!)) score += '0';
      else if (c.segments[i] === parts[i]) score += '1';
      else {
        ok = false;
        break;
      }
    }
    if (ok && score > bestScore) {
      best = c;
      bestScore = score;
    }
  }
  return best ? { pattern: best.pattern, need: best.need } : null;
}

/** Heavy computations, rate limited per principal (see rate-limit.ts). */
const HEAVY = new Set([
  '/api/v1/designs',
  '/api/v1/analyses',
  '/api/v1/suggestions',
  '/api/v1/jobs',
  '/api/v1/campaigns/[id]/designs',
  '/api/v1/campaigns/[id]/analyses',
  '/api/v1/campaigns/[id]/suggestions',
  '/api/v1/campaigns/[id]/next-trials',
]);

export function isHeavy(method: string, pattern: string): boolean {
  return method.toUpperCase() === 'POST' && HEAVY.has(pattern);
}
