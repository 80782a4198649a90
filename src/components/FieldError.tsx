'use client';
import type { ApiError } from './api-client';

/** A message box for a refused request: the field it names and how to fix it. */
export function ErrorBox({ error }: { error: ApiError | null }) {
  if (!error) return null;
  return (
    <div className="error" role="alert" data-testid="error">
      {error.field ? <strong>{error.field}: </strong> : null}
      {error.message.startsWith(`${error.field}: `) ? error.message.slice(error.field!.length + 2) : error.message}
    </div>
  );
}
