/**
 * The job runner on the configured database: progress reaches the job row, a cancel stops a design
 * search within a bound and keeps its best design, a failure is stored with its error (field named),
 * a queued job can be cancelled before it starts, and a restart fails jobs a dead server left running
 * and runs the queued ones. Also the /api/v1/jobs routes, called as the server calls them.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as createJobPOST, GET as listJobsGET } from '@/app/api/v1/jobs/route';
import { GET as getJobGET } from '@/app/api/v1/jobs/[id]/route';
import { POST as cancelJobPOST } from '@/app/api/v1/jobs/[id]/cancel/route';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { stopJobRunner } from '@/server/jobs';
import { finishers } from '@/server/jobs/kinds';
import { closePool } from '@/server/jobs/pool';
import { JobRunner } from '@/server/jobs/runner';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { listSuggestions } from '@/server/repos/suggestions';
import { finishTrial, startTrial } from '@/server/repos/trials';
import { getJob, type JobView } from '@/server/repos/jobs';
import { signed } from '../support/auth';
import { freshDatabase } from './database';

// the routes check credentials: these send an admin API token made in the test database
const [createJob, listJobsRoute, getJobRoute, cancelJobRoute] = [createJobPOST, listJobsGET, getJobGET, cancelJobPOST].map((h) => signed(h));

const factors = Array.from({ length: 6 }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous' as const, low: 0, high: 1 }));
const search = (starts: number) => ({ factors, method: 'optimal' as const, model: 'quadratic' as const, runs: 40, starts, seed: 3 });

async function waitFor(id: string, done: (j: JobView) => boolean, timeoutMs = 60_000): Promise<JobView> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const j = await getJob(id);
    if (done(j)) return j;
    if (Date.now() > until) throw new Error(`job ${id} still ${j.status} (${j.message})`);
    await new Promise((r) => setTimeout(r, 20));
  }
}
const finished = (j: JobView) => ['done', 'failed', 'cancelled'].includes(j.status);

beforeAll(async () => {
  await freshDatabase();
});

afterAll(async () => {
  await stopJobRunner();
  await closePool();
  await closeDb();
});

describe('job runner (in-process queue)', () => {
  let runner: JobRunner;

  beforeAll(async () => {
    runner = new JobRunner({ backend: 'local', serverId: 'test-a', concurrency: 1, finishers });
    await runner.start();
  });

  afterAll(async () => {
    await runner.stop();
  });

  it('writes progress with a readable message, then the result', async () => {
    // Long enough that a quiet machine still writes several progress values (at most four a second).
    const starts = 600;
    const job = await runner.submit('design-search', { task: 'design', input: search(starts) });
    expect(job.status).toBe('queued');
    const seen: JobView[] = [];
    const end = await waitFor(job.id, (j) => {
      seen.push(j);
      return finished(j);
    });
    const moving = seen.filter((j) => j.status === 'running' && j.progress > 0 && j.progress < 1);
    expect(moving.length).toBeGreaterThan(0);
    expect(moving.at(-1)!.message).toMatch(new RegExp(`^start \\d+ of ${starts}, best D-efficiency 0\\.\\d\\d$`));
    expect(new Set(moving.map((j) => j.progress)).size).toBeGreaterThan(1);
    expect(end.status).toBe('done');
    expect(end.progress).toBe(1);
    const result = end.result as { runs: unknown[]; diagnostics: { optimal: { startsCompleted: number; stopped: boolean } } };
    expect(result.runs).toHaveLength(40);
    expect(result.diagnostics.optimal).toMatchObject({ startsCompleted: starts, stopped: false });
    expect(end.startedAt && end.finishedAt).toBeTruthy();
  });

  it('cancels a running search through the row flag within a bound, keeping the best design so far', async () => {
    const job = await runner.submit('design-search', { task: 'design', input: search(10_000) });
    await waitFor(job.id, (j) => j.status === 'running' && j.progress > 0);
    // The flag is set in the row (as a cancel from another server would), not through this runner.
    const client = await db();
    const t0 = Date.now();
    await client.job.update({ where: { id: job.id }, data: { cancelRequested: true } });
    const end = await waitFor(job.id, finished);
    const took = Date.now() - t0;
    expect(end.status).toBe('cancelled');
    // Poll 100 ms + one exchange pass + the final write; a generous bound for a shared test machine.
    expect(took).toBeLessThan(2000);
    const result = end.result as { runs: unknown[]; diagnostics: { optimal: { startsCompleted: number; stopped: boolean } } };
    expect(result.runs).toHaveLength(40);
    expect(result.diagnostics.optimal.stopped).toBe(true);
    expect(result.diagnostics.optimal.startsCompleted).toBeLessThan(10_000);
  });

  it('stores a failure with its error, naming the field', async () => {
    const job = await runner.submit('design-search', { task: 'design', input: { ...search(5), runs: 5 } });
    const end = await waitFor(job.id, finished);
    expect(end.status).toBe('failed');
    expect(end.error).toMatchObject({ code: 'invalid_input', field: 'runs' });
    expect(end.error!.message).toMatch(/parameters/);
    expect(end.result).toBeUndefined();
  });

  it('cancels a queued job at once; it never runs', async () => {
    const first = await runner.submit('design-search', { task: 'design', input: search(60) });
    const second = await runner.submit('design-search', { task: 'design', input: search(60) });
    const cancelled = await runner.cancel(second.id);
    expect(cancelled.status).toBe('cancelled');
    await waitFor(first.id, finished);
    await runner.idle();
    const end = await getJob(second.id);
    expect(end.status).toBe('cancelled');
    expect(end.startedAt).toBeUndefined();
    await expect(runner.cancel(first.id)).rejects.toMatchObject({ code: 'conflict' });
  });

  it('after a restart: a job left running fails with a clear message; a queued one runs', async () => {
    const client = await db();
    const envelope = JSON.stringify({ task: 'design', input: search(10) });
    const orphan = await client.job.create({ data: { kind: 'design-search', status: 'running', worker: 'test-dead', startedAt: new Date(), inputJson: envelope } });
    const waiting = await client.job.create({ data: { kind: 'design-search', inputJson: envelope } });
    const restarted = new JobRunner({ backend: 'local', serverId: 'test-b', concurrency: 1, finishers });
    await restarted.start();
    const failed = await getJob(orphan.id);
    expect(failed.status).toBe('failed');
    expect(failed.error).toMatchObject({ code: 'interrupted' });
    expect(failed.error!.message).toMatch(/server stopped while this job ran/);
    const ran = await waitFor(waiting.id, finished);
    expect(ran.status).toBe('done');
    await restarted.stop();
  });
});

describe('/api/v1/jobs', () => {
  const ctx = (id: string) => ({ params: Promise.resolve({ id }) });
  const post = (body: unknown) => createJob(new Request('http://x/api/v1/jobs', { method: 'POST', body: JSON.stringify(body) }), ctx(''));

  it('refuses bad bodies with the field named', async () => {
    for (const [body, field] of [
      [{ kind: 'sleep', input: {} }, 'kind'],
      [{ kind: 'design-search' }, 'input'],
      [{ kind: 'design-search', input: { ...search(10), runs: 'many' } }, 'input.runs'],
      [{ kind: 'suggestions', input: { factors, data: [], response: 'y', goal: 'up', count: 1 } }, 'input.goal'],
    ] as const) {
      const res = await post(body);
      expect(res.status).toBe(400);
      expect(((await res.json()) as { error: { field: string } }).error.field).toBe(field);
    }
    const missing = await getJobRoute(new Request('http://x/api/v1/jobs/nope'), ctx('nope'));
    expect(missing.status).toBe(404);
  });

  it('runs a campaign design search: 202, then progress, then the design', async () => {
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Job target (invented)',
        factors: [
          { name: 'preload', kind: 'continuous', low: 1, high: 5 },
          { name: 'payload', kind: 'continuous', low: 0, high: 2 },
          { name: 'angle', kind: 'continuous', low: 10, high: 40 },
        ],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench A' }],
      }),
    );
    const res = await post({ kind: 'design-search', campaignId: c.id, input: { method: 'optimal', model: 'quadratic', runs: 14, starts: 50, seed: 2 } });
    expect(res.status).toBe(202);
    const { id, status } = (await res.json()) as { id: string; status: string };
    expect(status).toBe('queued');
    let body: Record<string, unknown> = {};
    for (let i = 0; i < 3000; i++) {
      body = (await (await getJobRoute(new Request(`http://x/api/v1/jobs/${id}`), ctx(id))).json()) as Record<string, unknown>;
      if (body.status === 'done' || body.status === 'failed') break;
      await new Promise((r) => setTimeout(r, 20));
    }
    expect(body).toMatchObject({ id, kind: 'design-search', status: 'done', progress: 1, campaignId: c.id });
    expect((body.result as { runs: unknown[] }).runs).toHaveLength(14);
    expect(Object.keys(body)).not.toContain('inputJson');
    const again = await cancelJobRoute(new Request(`http://x/api/v1/jobs/${id}/cancel`, { method: 'POST' }), ctx(id));
    expect(again.status).toBe(409);
    const listed = (await (await listJobsRoute(new Request(`http://x/api/v1/jobs?campaignId=${c.id}`), ctx(''))).json()) as { jobs: { id: string }[] };
    expect(listed.jobs.map((j) => j.id)).toContain(id);
  });

  it('runs a campaign surrogate batch as a job and stores its proposals when it finishes', async () => {
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Batch target (invented)',
        factors: [
          { name: 'preload', kind: 'continuous', low: 1, high: 5 },
          { name: 'payload', kind: 'continuous', low: 0, high: 2 },
        ],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench A' }],
      }),
    );
    await commitDesign(c.id, { method: 'full-factorial', model: 'interactions', centerPoints: 2, seed: 1 });
    const now = new Date('2026-11-30T09:00:00Z');
    for (const [i, run] of (await listRuns(c.id)).entries()) {
      const { trial } = await startTrial(c.id, { runId: run.id, operator: 'op' }, `key-batch-${i}-xxxx`, 'tester', now);
      const v = run.values as { preload: number; payload: number };
      await finishTrial(c.id, trial.id, { observations: { apex_height: 150 + 12 * v.preload - 20 * v.payload + i }, status: 'done', failureReason: '', notes: '' }, 'tester', now);
    }
    const before = (await listSuggestions(c.id)).length;
    const bad = await post({ kind: 'suggestions', campaignId: c.id, input: { response: 'hop_length', count: 2 } });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { field: string } }).error.field).toBe('input.response');
    const res = await post({ kind: 'suggestions', campaignId: c.id, input: { response: 'apex_height', strategy: 'improve', count: 2, seed: 3 } });
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as { id: string };
    const end = await waitFor(id, finished);
    expect(end.status).toBe('done');
    const result = end.result as { suggestions: { id: string; reason: string }[]; slices: unknown[]; model: { kernel: string } };
    expect(result.suggestions).toHaveLength(2);
    expect(result.slices).toHaveLength(2);
    const stored = await listSuggestions(c.id);
    expect(stored.length).toBe(before + 2);
    expect(stored.map((s) => s.id)).toEqual(expect.arrayContaining(result.suggestions.map((s) => s.id)));
  });
});
