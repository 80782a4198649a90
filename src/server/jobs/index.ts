/**
 * The process's job runner: PostgreSQL → pg-boss queue shared by every app server; SQLite → in-process
 * queue. SALTUS_JOB_WORK=0 makes a server submit and read jobs without running any.
 */
import { databaseConfig } from '@/server/db/config';
import { finishers } from './kinds';
import { JobRunner } from './runner';

const globalForJobs = globalThis as unknown as { saltusJobs?: JobRunner };

export function jobRunner(env: Record<string, string | undefined> = process.env): JobRunner {
  if (!globalForJobs.saltusJobs) {
    const config = databaseConfig(env);
    globalForJobs.saltusJobs = new JobRunner({
      backend: config.provider === 'postgresql' ? 'pg-boss' : 'local',
      pgUrl: config.provider === 'postgresql' ? config.url : undefined,
      work: env.SALTUS_JOB_WORK !== '0',
      finishers,
    });
  }
  return globalForJobs.saltusJobs;
}

/** The runner, started (recovery done, taking jobs). */
export async function startedJobRunner(): Promise<JobRunner> {
  const runner = jobRunner();
  await runner.start();
  return runner;
}

/** Stop the process's runner (tests, shutdown). */
export async function stopJobRunner(): Promise<void> {
  const runner = globalForJobs.saltusJobs;
  globalForJobs.saltusJobs = undefined;
  if (runner) await runner.stop();
}

export { JobRunner } from './runner';
