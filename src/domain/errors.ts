/**
 * Typed domain errors. Every error a person can cause carries the field at fault and a message
 * that says how to fix it. The API maps these to 4xx JSON `{ error: { code, message, field } }`.
 */
export type DomainErrorCode =
  | 'invalid_input'
  | 'singular_design'
  | 'infeasible'
  | 'not_found'
  | 'conflict'
  | 'unsupported';

export class DomainError extends Error {
  readonly code: DomainErrorCode;
  readonly field: string | undefined;
  readonly details: unknown;

  constructor(code: DomainErrorCode, message: string, field?: string, details?: unknown) {
    super(message);
    this.name = 'DomainError';
    this.code = code;
    this.field = field;
    this.details = details;
  }
}

/** Shorthand for the most common case: a named input is wrong; say how to fix it. */
export function invalidInput(field: string, message: string, details?: unknown): DomainError {
  return new DomainError('invalid_input', message, field, details);
}

export function isDomainError(e: unknown): e is DomainError {
  return e instanceof DomainError;
}
