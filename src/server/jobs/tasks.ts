/**
 * The computations a job or a pooled request runs, as plain functions of JSON input: they import only the
 * pure domain core, so a worker thread can load them without Next.js or Prisma. Progress goes out through
 * `onProgress(fraction, message)`; `shouldStop()` asks a search to end early with its best result so far.
 */
import { generateDesign, type DesignSpec, type OptimalProgress } from '../../domain/design';
import { DomainError, isDomainError } from '../../domain/errors';
import { fitSurrogate, suggestTrials, surrogateSlice, type SuggestionRequest } from '../../domain/surrogate';

export type TaskKind = 'design' | 'suggestions' | 'surrogate-batch';

export interface TaskHooks {
  onProgress?: (fraction: number, message: string) => void;
  shouldStop?: () => boolean;
}

/** An error as it crosses a thread: domain errors keep their code and field. */
export interface TaskError {
  code: string;
  message: string;
  field: string | null;
  details?: unknown;
  domain: boolean;
}

export type TaskOutcome = { ok: true; result: unknown; stopped: boolean } | { ok: false; error: TaskError };

export function describeProgress(p: OptimalProgress): string {
  const best =
    p.best === null ? '' : p.criterion === 'D' ? `, best D-efficiency ${p.best.toFixed(2)}` : `, best average prediction variance ${p.best.toFixed(3)}`;
  return `start ${p.startsCompleted} of ${p.starts}${best}`;
}

function designTask(spec: DesignSpec, hooks: TaskHooks) {
  hooks.onProgress?.(0, spec.method === 'optimal' ? 'searching' : 'constructing');
  const result = generateDesign(spec, {
    onProgress: (fraction, detail) => hooks.onProgress?.(fraction, describeProgress(detail)),
    shouldStop: hooks.shouldStop,
  });
  return { result, stopped: result.diagnostics.optimal?.stopped === true };
}

function suggestionTask(request: SuggestionRequest, hooks: TaskHooks) {
  hooks.onProgress?.(0.05, 'fitting the Gaussian-process surrogate');
  const result = suggestTrials(request);
  hooks.onProgress?.(1, `${result.suggestions.length} suggestions`);
  return { result, stopped: false };
}

/**
 * A campaign batch: the suggestions plus the surrogate's mean ± sd along every factor through the best
 * suggestion (the picture on the next-trials page), both computed here so nothing heavy is left for the caller.
 */
function surrogateBatchTask(request: SuggestionRequest, hooks: TaskHooks) {
  hooks.onProgress?.(0.05, 'fitting the Gaussian-process surrogate');
  const result = suggestTrials(request);
  hooks.onProgress?.(0.7, 'drawing the surrogate along each factor');
  const model = fitSurrogate(request);
  const held = result.suggestions[0]?.values ?? {};
  const slices = request.factors.map((f) => surrogateSlice(model, f.name, held, 40));
  hooks.onProgress?.(1, `${result.suggestions.length} suggestions`);
  return { result: { ...result, slices }, stopped: false };
}

export function toTaskError(e: unknown): TaskError {
  if (isDomainError(e)) return { code: e.code, message: e.message, field: e.field ?? null, details: e.details ?? undefined, domain: true };
  const message = e instanceof Error ? e.message : String(e);
  return { code: 'internal', message, field: null, domain: false };
}

/** Back to an exception on the caller's side: a DomainError when the task raised one. */
export function fromTaskError(e: TaskError): Error {
  if (e.domain) return new DomainError(e.code as DomainError['code'], e.message, e.field ?? undefined, e.details);
  return new Error(e.message);
}

/** Run one task to its outcome; never throws. */
export function runTask(kind: TaskKind, input: unknown, hooks: TaskHooks = {}): TaskOutcome {
  try {
    switch (kind) {
      case 'design':
        return { ok: true, ...designTask(input as DesignSpec, hooks) };
      case 'suggestions':
        return { ok: true, ...suggestionTask(input as SuggestionRequest, hooks) };
      case 'surrogate-batch':
        return { ok: true, ...surrogateBatchTask(input as SuggestionRequest, hooks) };
      default:
        throw new DomainError('invalid_input', `unknown task kind "${String(kind)}"`, 'kind');
    }
  } catch (e) {
    return { ok: false, error: toTaskError(e) };
  }
}
