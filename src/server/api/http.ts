/**
 * HTTP edges for route handlers: check who is calling (src/server/auth/guard.ts, against the one
 * permission table), read a JSON body safely, run the handler, map domain errors to 4xx JSON
 * `{ error: { code, message, field } }`. A 500 never carries a stack trace. Every route file uses
 * `route` or `jsonPost`, so no route can skip the check.
 */
import { DomainError, isDomainError } from '@/domain/errors';
import { guard, type Caller } from '@/server/auth/guard';

export type { Caller } from '@/server/auth/guard';

const STATUS: Record<DomainError['code'], number> = {
  invalid_input: 400,
  singular_design: 422,
  infeasible: 422,
  not_found: 404,
  conflict: 409,
  unsupported: 400,
};

export const MAX_JSON_BYTES = 5 * 1024 * 1024;

/** A client-made Idempotency-Key: 8–100 letters, digits or . _ : - */
export const IDEMPOTENCY_KEY = /^[A-Za-z0-9_.:-]{8,100}$/;

export function jsonResponse(body: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(body), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function errorResponse(e: unknown): Response {
  if (isDomainError(e)) {
    return jsonResponse({ error: { code: e.code, message: e.message, field: e.field ?? null, details: e.details ?? undefined } }, STATUS[e.code]);
  }
  console.error('[saltus] unexpected error', e);
  return jsonResponse({ error: { code: 'internal', message: 'unexpected server error; the request was not applied', field: null } }, 500);
}

/** Read the request body as JSON with a size limit; malformed JSON is a 400 naming the body. */
export async function readJson(req: Request, maxBytes = MAX_JSON_BYTES): Promise<unknown> {
  const text = await readText(req, maxBytes);
  if (text.trim() === '') throw new DomainError('invalid_input', 'the request body is empty; send a JSON object', '(body)');
  try {
    return JSON.parse(text);
  } catch {
    throw new DomainError('invalid_input', 'the request body is not valid JSON; check quotes, commas and brackets', '(body)');
  }
}

export async function readText(req: Request, maxBytes = MAX_JSON_BYTES): Promise<string> {
  const declared = Number(req.headers.get('content-length') ?? '0');
  if (declared > maxBytes) {
    throw new DomainError('invalid_input', `the request body is larger than ${Math.round(maxBytes / 1024)} KiB; send less data`, '(body)');
  }
  const text = await req.text();
  if (text.length > maxBytes) {
    throw new DomainError('invalid_input', `the request body is larger than ${Math.round(maxBytes / 1024)} KiB; send less data`, '(body)');
  }
  return text;
}

/** Wrap a JSON POST handler: caller checked, body → result, errors mapped. */
export function jsonPost<T>(handler: (body: unknown, req: Request, caller: Caller) => T | Promise<T>) {
  return async (req: Request): Promise<Response> => {
    try {
      const caller = await guard(req);
      if (caller instanceof Response) return caller;
      const body = await readJson(req);
      return jsonResponse(await handler(body, req, caller));
    } catch (e) {
      return errorResponse(e);
    }
  };
}

type Params = Record<string, string>;
type Ctx = { params: Promise<Params> };

/**
 * Wrap any handler with route params: caller checked (401/403/429 before the handler runs), errors
 * mapped to 4xx JSON, results to 200 (or the given status). The handler gets the caller, whose
 * `actor` goes to the audit trail.
 */
export function route<T>(handler: (req: Request, params: Params, caller: Caller) => Promise<T | Response>, status = 200) {
  return async (req: Request, ctx: Ctx): Promise<Response> => {
    try {
      const caller = await guard(req);
      if (caller instanceof Response) return caller;
      const result = await handler(req, await ctx.params, caller);
      return result instanceof Response ? result : jsonResponse(result, status);
    } catch (e) {
      return errorResponse(e);
    }
  };
}
