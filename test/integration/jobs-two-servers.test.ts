/**
 * Several app servers on one PostgreSQL database: two job runners (as two servers would run them, each
 * with its own pg-boss connection and worker pool) share the pg-boss queue and the Job rows. A job
 * submitted through A (which takes no jobs) is taken and finished by B; a cancel requested through A
 * reaches the search running on B through the row's flag. Skipped on SQLite (one server only).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/server/db/client';
import { databaseConfig } from '@/server/db/config';
import { finishers } from '@/server/jobs/kinds';
import { closePool } from '@/server/jobs/pool';
import { JobRunner } from '@/server/jobs/runner';
import { getJob, type JobView } from '@/server/repos/jobs';
import { freshDatabase } from './database';

const config = databaseConfig();
const onPostgres = config.provider === 'postgresql';
const schema = 'pgboss_two_servers';

const factors = Array.from({ length: 6 }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous' as const, low: 0, high: 1 }));
const search = (starts: number) => ({ task: 'design' as const, input: { factors, method: 'optimal', model: 'quadratic', runs: 40, starts, seed: 5 } });

async function waitFor(id: string, done: (j: JobView) => boolean, timeoutMs = 90_000): Promise<JobView> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const j = await getJob(id);
    if (done(j)) return j;
    if (Date.now() > until) throw new Error(`job ${id} still ${j.status} (${j.message})`);
    await new Promise((r) => setTimeout(r, 25));
  }
}
const finished = (j: JobView) => ['done', 'failed', 'cancelled'].includes(j.status);

describe.skipIf(!onPostgres)('jobs across two servers on one PostgreSQL database', () => {
  let a: JobRunner;
  let b: JobRunner;

  beforeAll(async () => {
    await freshDatabase();
    const { default: pg } = await import('pg');
    const client = new pg.Client({ connectionString: config.url });
    await client.connect();
    await client.query(`DROP SCHEMA IF EXISTS ${schema} CASCADE`);
    await client.end();
    const common = { backend: 'pg-boss' as const, pgUrl: config.url, pgSchema: schema, pollingIntervalSeconds: 0.5, finishers };
    a = new JobRunner({ ...common, serverId: 'server-a', work: false });
    b = new JobRunner({ ...common, serverId: 'server-b', work: true, concurrency: 1 });
    await a.start();
    await b.start();
  });

  afterAll(async () => {
    await a?.stop();
    await b?.stop();
    await closePool();
    await closeDb();
  });

  it('a job submitted through A is taken and finished by B', async () => {
    const job = await a.submit('design-search', search(30));
    const end = await waitFor(job.id, finished);
    expect(end.status).toBe('done');
    expect((end.result as { runs: unknown[] }).runs).toHaveLength(40);
    const { db } = await import('@/server/db/client');
    const row = await (await db()).job.findUniqueOrThrow({ where: { id: job.id } });
    expect(row.worker).toBe('server-b');
  });

  it('a cancel requested through A stops the search running on B, keeping its best design', async () => {
    const job = await a.submit('design-search', search(10_000));
    await waitFor(job.id, (j) => j.status === 'running' && j.progress > 0);
    const t0 = Date.now();
    const asked = await a.cancel(job.id);
    expect(asked.cancelRequested).toBe(true);
    const end = await waitFor(job.id, finished);
    expect(end.status).toBe('cancelled');
    expect(Date.now() - t0).toBeLessThan(3000);
    const result = end.result as { runs: unknown[]; diagnostics: { optimal: { stopped: boolean } } };
    expect(result.runs).toHaveLength(40);
    expect(result.diagnostics.optimal.stopped).toBe(true);
  });

  it('when a server restarts, the job it left running fails with a clear message; other servers\' jobs are untouched', async () => {
    const { db } = await import('@/server/db/client');
    const client = await db();
    const left = await client.job.create({ data: { kind: 'design-search', status: 'running', worker: 'server-c', startedAt: new Date(), inputJson: JSON.stringify(search(5)) } });
    const other = await client.job.create({ data: { kind: 'design-search', status: 'running', worker: 'server-d', startedAt: new Date(), inputJson: JSON.stringify(search(5)) } });
    const c = new JobRunner({ backend: 'pg-boss', pgUrl: config.url, pgSchema: schema, serverId: 'server-c', work: false, finishers });
    await c.start();
    await c.stop();
    expect((await getJob(left.id)).status).toBe('failed');
    expect((await getJob(left.id)).error!.message).toMatch(/server stopped/);
    // Another server's running job is not touched.
    expect((await getJob(other.id)).status).toBe('running');
  });
});
