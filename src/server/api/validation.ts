/**
 * Turning untrusted input into typed values with zod, and zod's complaints into domain errors that
 * name the field and say how to fix it.
 */
import type { z } from 'zod';
import { DomainError, invalidInput } from '@/domain/errors';

function pathToField(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) {
    if (typeof p === 'number') s += `[${p}]`;
    else s += s ? `.${String(p)}` : String(p);
  }
  return s || '(body)';
}

/** Parse `input` with `schema`; on failure throw a DomainError for the first issue, naming its field. */
export function parseWith<S extends z.ZodType>(schema: S, input: unknown, fieldPrefix = ''): z.output<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const issue = result.error.issues[0]!;
  const field = [fieldPrefix, pathToField(issue.path)].filter(Boolean).join('.');
  throw invalidInput(field, `${field}: ${issue.message}`, result.error.issues.slice(0, 10).map((i) => ({ field: pathToField(i.path), message: i.message })));
}

export { DomainError };
