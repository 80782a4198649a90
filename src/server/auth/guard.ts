/**
 * The gate every API request passes (called by the wrappers in src/server/api/http.ts): find the
 * route in the permission table, authenticate, compare roles, check CSRF for cookie-signed changes
 * and the heavy-computation rate limit. Answers 401 / 403 / 429 as JSON `{ error: { code, message, field } }`.
 */
import { lookupPermission, isHeavy, type Need } from './permissions';
import { takeHeavy } from './rate-limit';
import { roleAtLeast } from './roles';
import { authenticate, csrfProblem, CSRF_HEADER, SESSION_COOKIE, type Principal } from './sessions';

export interface Anonymous {
  kind: 'anonymous';
  actor: 'anonymous';
  role: null;
  name: '';
}
export type Caller = Principal | Anonymous;
export const ANONYMOUS: Anonymous = { kind: 'anonymous', actor: 'anonymous', role: null, name: '' };

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function answer(status: number, code: string, message: string, field: string | null, headers: Record<string, string> = {}, details?: unknown): Response {
  return new Response(JSON.stringify({ error: { code, message, field, details } }), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function unauthenticated(reason?: string): Response {
  return answer(
    401,
    'unauthenticated',
    reason ??
      `this API needs credentials: send "Authorization: Bearer saltus_…" with a token from \`npm run saltus -- token create\`, or sign in at /login so the browser sends the ${SESSION_COOKIE} cookie`,
    'Authorization',
    { 'www-authenticate': 'Bearer realm="saltus"' },
  );
}

export function tooMany(message: string, retryAfterSeconds: number, field: string | null = null): Response {
  return answer(429, 'rate_limited', `${message}; try again in ${retryAfterSeconds} s`, field, { 'retry-after': String(retryAfterSeconds) }, { retryAfterSeconds });
}

/** The caller when the request may go on, or the refusal to send. */
export async function guard(req: Request): Promise<Caller | Response> {
  const method = req.method.toUpperCase();
  const { pathname } = new URL(req.url);
  const entry = lookupPermission(method, pathname);
  // Not in the table: admin only, so a route added without its line is closed rather than open.
  const need: Need = entry?.need ?? 'admin';
  if (need === 'public') return ANONYMOUS;

  const result = await authenticate(req);
  if (result === null) return unauthenticated();
  if (!result.ok) return unauthenticated(result.reason);
  const principal = result.principal;

  if (!roleAtLeast(principal.role, need)) {
    return answer(
      403,
      'forbidden',
      `${method} ${entry?.pattern ?? pathname} needs the ${need} role${need === 'admin' ? '' : ' or higher'}; ${principal.actor} has the ${principal.role} role — ask an admin`,
      null,
      {},
      { needed: need, role: principal.role },
    );
  }
  if (principal.kind === 'session' && !SAFE_METHODS.has(method)) {
    const problem = csrfProblem(req, principal.sessionSecret!);
    if (problem) return answer(403, 'csrf', problem, CSRF_HEADER);
  }
  if (entry && isHeavy(method, entry.pattern)) {
    const limited = takeHeavy(principal.actor);
    if (limited) return tooMany(`${principal.actor} has started too many heavy computations in a short time`, limited.retryAfterSeconds);
  }
  return principal;
}
