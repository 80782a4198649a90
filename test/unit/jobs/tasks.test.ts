/**
 * The pool's task layer without threads: progress messages, stop requests, errors that keep their code and
 * field across the thread boundary, and where the worker entry is found.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { poolThreads, workerFile } from '@/server/jobs/pool';
import { describeProgress, fromTaskError, runTask, toTaskError } from '@/server/jobs/tasks';

const factors = [
  { name: 'preload', kind: 'continuous', low: 1, high: 5 },
  { name: 'payload', kind: 'continuous', low: 0, high: 2 },
  { name: 'angle', kind: 'continuous', low: 10, high: 40 },
];

describe('design task', () => {
  it('reports each start with the best D-efficiency so far, ending at 1', () => {
    const seen: [number, string][] = [];
    const out = runTask('design', { factors, method: 'optimal', model: 'quadratic', runs: 14, starts: 6, seed: 2 }, { onProgress: (f, m) => seen.push([f, m]) });
    expect(out.ok).toBe(true);
    expect(seen[0]).toEqual([0, 'searching']);
    expect(seen.slice(1).map(([f]) => f)).toEqual([1, 2, 3, 4, 5, 6].map((k) => k / 6));
    expect(seen.at(-1)![1]).toMatch(/^start 6 of 6, best D-efficiency 0\.\d\d$/);
    // The message's efficiency is the design's own D-efficiency (the search's M is X'X here).
    const result = (out as { result: { diagnostics: { dEfficiency: number } } }).result;
    expect(seen.at(-1)![1]).toContain(result.diagnostics.dEfficiency.toFixed(2));
  });

  it('stops when asked and marks the result stopped, keeping the best design so far', () => {
    let calls = 0;
    const out = runTask('design', { factors, method: 'optimal', model: 'quadratic', runs: 14, starts: 500, seed: 2 }, { shouldStop: () => ++calls > 8 });
    expect(out).toMatchObject({ ok: true, stopped: true });
    const result = (out as { result: { runs: unknown[]; diagnostics: { optimal: { startsCompleted: number } } } }).result;
    expect(result.runs).toHaveLength(14);
    expect(result.diagnostics.optimal.startsCompleted).toBeLessThan(500);
  });

  it('keeps a domain error code and field', () => {
    const out = runTask('design', { factors, method: 'optimal', model: 'quadratic', runs: 3 });
    expect(out.ok).toBe(false);
    const err = (out as { error: ReturnType<typeof toTaskError> }).error;
    expect(err).toMatchObject({ code: 'invalid_input', field: 'runs', domain: true });
    const back = fromTaskError(err);
    expect(back).toBeInstanceOf(DomainError);
    expect(back).toMatchObject({ code: 'invalid_input', field: 'runs' });
  });
});

describe('errors and settings', () => {
  it('does not pass an unexpected error off as a domain error', () => {
    const err = toTaskError(new TypeError('boom'));
    expect(err).toMatchObject({ code: 'internal', domain: false });
    expect(fromTaskError(err)).not.toBeInstanceOf(DomainError);
    expect(runTask('sleep' as never, {})).toMatchObject({ ok: false, error: { field: 'kind' } });
  });

  it('describes I-criterion progress by the average prediction variance', () => {
    expect(describeProgress({ startsCompleted: 3, starts: 10, criterion: 'I', best: 0.4219 })).toBe('start 3 of 10, best average prediction variance 0.422');
    expect(describeProgress({ startsCompleted: 1, starts: 10, criterion: 'D', best: null })).toBe('start 1 of 10');
  });

  it('finds the worker entry from the project root and sizes the pool', () => {
    expect(workerFile({})).toBe(path.join(process.cwd(), 'src', 'server', 'jobs', 'worker.mjs'));
    expect(workerFile({ SALTUS_ROOT: 'elsewhere' })).toBe(path.join(path.resolve('elsewhere'), 'src', 'server', 'jobs', 'worker.mjs'));
    expect(poolThreads({ SALTUS_JOB_THREADS: '3' })).toBe(3);
    expect(poolThreads({ SALTUS_JOB_THREADS: 'many' })).toBeGreaterThanOrEqual(1);
  });
});
