'use client';
/** Browser-side calls to the JSON API; errors come back with the field they name. */

export interface ApiError {
  code: string;
  message: string;
  field: string | null;
  details?: unknown;
}

/**
 * Changes made with the session cookie carry the x-csrf-token header: the value of the readable
 * saltus_csrf cookie set at sign-in (bound to the session on the server). Read at send time, so
 * entries replayed later from the rig outbox carry the current value.
 */
export function csrfHeader(method: string): Record<string, string> {
  if (method === 'GET' || typeof document === 'undefined') return {};
  const m = /(?:^|;\s*)saltus_csrf=([^;]*)/.exec(document.cookie);
  return m ? { 'x-csrf-token': decodeURIComponent(m[1]!) } : {};
}

export type ApiResult<T> = { ok: true; data: T; status: number } | { ok: false; error: ApiError; status: number };

export async function callApi<T>(url: string, method: 'GET' | 'POST', body?: unknown, headers: Record<string, string> = {}): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers: { 'content-type': 'application/json', ...csrfHeader(method), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    return { ok: false, status: 0, error: { code: 'offline', message: 'the server could not be reached; check the network and try again', field: null } };
  }
  let json: unknown = null;
  try {
    json = await res.json();
  } catch {
    /* empty or non-JSON answer */
  }
  if (res.ok) return { ok: true, data: json as T, status: res.status };
  const err = (json as { error?: ApiError } | null)?.error;
  return { ok: false, status: res.status, error: err ?? { code: 'http_' + res.status, message: `the server answered ${res.status}`, field: null } };
}

export const postJson = <T,>(url: string, body: unknown, headers?: Record<string, string>) => callApi<T>(url, 'POST', body, headers);

/** POST a file's content (CSV text or the bytes of a log) with query parameters; the answer is JSON like callApi's. */
export async function postText<T>(url: string, body: string | ArrayBuffer | Blob, contentType = 'text/csv'): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, { method: 'POST', headers: { 'content-type': contentType, ...csrfHeader('POST') }, body });
  } catch {
    return { ok: false, status: 0, error: { code: 'offline', message: 'the server could not be reached; check the network and try again', field: null } };
  }
  let json: unknown = null;
  try {
    json = await res.json();
  } catch {
    /* empty or non-JSON answer */
  }
  if (res.ok) return { ok: true, data: json as T, status: res.status };
  const err = (json as { error?: ApiError } | null)?.error;
  return { ok: false, status: res.status, error: err ?? { code: 'http_' + res.status, message: `the server answered ${res.status}`, field: null } };
}
