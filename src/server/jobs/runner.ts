/**
 * The job runner: takes job records from a queue and runs their computation in the worker pool.
 *
 * - SQLite (one server): an in-process FIFO feeds the pool. At start, jobs a dead server left running are
 *   marked failed and queued ones are queued again.
 * - PostgreSQL (one or several servers): pg-boss is the queue, so any server's runner may take any job;
 *   the Job row stays the status record every server reads and writes. At start, a server fails the jobs
 *   its own earlier life left running; a job whose server vanished is offered again by pg-boss once its
 *   expiry passes and re-run by whichever server takes it.
 *
 * While a job runs, its progress is written to the row at most every `progressIntervalMs`, and the row's
 * cancel flag is polled every `cancelPollMs`; a cancel asks a design search to stop with its best design
 * so far (a flag the search reads between passes) and ends other computations outright.
 */
import os from 'node:os';
import { isDomainError } from '@/domain/errors';
import {
  claimJob,
  createJob,
  failOrphanedJobs,
  findJob,
  finishJob,
  isCancelRequested,
  queuedJobIds,
  reclaimJob,
  reportProgress,
  requestCancel,
  toJobView,
  type JobEnd,
  type JobError,
  type JobView,
} from '@/server/repos/jobs';
import { parseJson } from '@/server/repos/mappers';
import { poolThreads, requestStop, runInPool, stopFlag } from './pool';
import type { TaskKind } from './tasks';

/** What a job row's input holds: the task for the pool, and what to do with its result. */
export interface JobEnvelope {
  task: TaskKind;
  input: unknown;
  /** A hook named in `finishers` that turns the computed result into the stored one (e.g. saves proposals). */
  after?: { type: string; [key: string]: unknown };
}

export type Finisher = (envelope: JobEnvelope, result: unknown, job: { id: string; createdBy: string }) => Promise<unknown>;

export interface RunnerOptions {
  /** This server's identity, stable across restarts (default host:PORT). */
  serverId?: string;
  backend: 'local' | 'pg-boss';
  /** PostgreSQL URL for pg-boss. */
  pgUrl?: string;
  /** pg-boss schema (default "pgboss"). */
  pgSchema?: string;
  /** Take jobs on this server (default true); a server with false only submits and reads. */
  work?: boolean;
  /** Jobs run at once (default: the pool's threads). */
  concurrency?: number;
  cancelPollMs?: number;
  progressIntervalMs?: number;
  /** After a cancel, how long a design search may take to hand back its best design before it is ended. */
  stopGraceMs?: number;
  /** pg-boss: how often an idle worker asks for a job, seconds (at least 0.5). */
  pollingIntervalSeconds?: number;
  /** pg-boss: a job active this long without finishing is offered again (its server is presumed gone). */
  expireInSeconds?: number;
  finishers?: Record<string, Finisher>;
}

export const QUEUE = 'saltus-jobs';

/** Tasks whose search can stop early and hand back its best result so far. */
const COOPERATIVE: ReadonlySet<TaskKind> = new Set(['design']);

interface Running {
  cancel: () => void;
}

type Boss = import('pg-boss');

export function defaultServerId(env: Record<string, string | undefined> = process.env): string {
  return env.SALTUS_SERVER_ID ?? `${os.hostname()}:${env.PORT ?? '3000'}`;
}

export class JobRunner {
  readonly serverId: string;
  private readonly options: Required<Pick<RunnerOptions, 'cancelPollMs' | 'progressIntervalMs' | 'stopGraceMs' | 'concurrency' | 'work'>> & RunnerOptions;
  private readonly queue: string[] = [];
  private readonly running = new Map<string, Running>();
  private active = 0;
  private boss: Boss | null = null;
  private started: Promise<void> | null = null;
  private stopped = false;
  private idleWaiters: (() => void)[] = [];

  constructor(options: RunnerOptions) {
    this.serverId = options.serverId ?? defaultServerId();
    this.options = {
      cancelPollMs: 100,
      progressIntervalMs: 250,
      stopGraceMs: 3000,
      concurrency: poolThreads(),
      work: true,
      ...options,
    };
  }

  /** Recover after a restart and begin taking jobs. Safe to call more than once. */
  start(): Promise<void> {
    this.started ??= this.doStart().catch((e: unknown) => {
      this.started = null;
      throw e;
    });
    return this.started;
  }

  private async doStart(): Promise<void> {
    if (this.options.backend === 'local') {
      await failOrphanedJobs();
      if (this.options.work) for (const id of await queuedJobIds()) this.queue.push(id);
      this.pump();
      return;
    }
    await failOrphanedJobs(this.serverId);
    const { default: PgBoss } = await import('pg-boss');
    const boss = new PgBoss({ connectionString: this.options.pgUrl, schema: this.options.pgSchema ?? 'pgboss', max: 4 });
    boss.on('error', (e: unknown) => console.error('[saltus] job queue error', e));
    await boss.start();
    if (!(await boss.getQueue(QUEUE))) {
      try {
        await boss.createQueue(QUEUE, { name: QUEUE, retryLimit: 1, retryDelay: 1, expireInSeconds: this.options.expireInSeconds ?? 15 * 60 });
      } catch (e) {
        // Another server created it at the same moment.
        if (!(await boss.getQueue(QUEUE))) throw e;
      }
    }
    this.boss = boss;
    if (this.options.work) {
      const pollingIntervalSeconds = Math.max(0.5, this.options.pollingIntervalSeconds ?? 1);
      for (let i = 0; i < this.options.concurrency; i++) {
        await boss.work<{ jobId: string }>(QUEUE, { batchSize: 1, pollingIntervalSeconds }, async (jobs) => {
          for (const job of jobs) await this.execute(job.data.jobId, true);
        });
      }
    }
  }

  /** Store a job and queue it; answers its record (status queued). */
  async submit(kind: string, envelope: JobEnvelope, meta: { campaignId?: string; createdBy?: string } = {}): Promise<JobView> {
    await this.start();
    const row = await createJob({ kind, input: envelope, campaignId: meta.campaignId, createdBy: meta.createdBy });
    await this.enqueue(row.id);
    return toJobView(row);
  }

  /** Ask a job to stop (any server's job: the flag is in its row). */
  async cancel(id: string, actor = 'local'): Promise<JobView> {
    const view = await requestCancel(id, actor);
    this.interrupt(id);
    return view;
  }

  /**
   * Stop a job this runner is running now, without waiting for the next poll of its row (after the
   * caller has set the row's flag with requestCancel).
   */
  interrupt(id: string): void {
    this.running.get(id)?.cancel();
  }

  /** Resolves when this runner has nothing queued or running (tests). */
  idle(): Promise<void> {
    if (this.active === 0 && this.queue.length === 0) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  async stop(): Promise<void> {
    this.stopped = true;
    for (const r of this.running.values()) r.cancel();
    if (this.boss) await this.boss.stop({ graceful: true, wait: true, timeout: 10_000, close: true });
    this.boss = null;
    await this.idle();
  }

  private async enqueue(id: string): Promise<void> {
    if (this.boss) {
      await this.boss.send(QUEUE, { jobId: id });
      return;
    }
    if (this.options.backend === 'pg-boss') throw new Error('the job queue has not started');
    this.queue.push(id);
    this.pump();
  }

  private pump(): void {
    while (!this.stopped && this.options.work && this.active < this.options.concurrency && this.queue.length > 0) {
      const id = this.queue.shift()!;
      this.active++;
      void this.execute(id, false).finally(() => {
        this.active--;
        this.pump();
        if (this.active === 0 && this.queue.length === 0) for (const w of this.idleWaiters.splice(0)) w();
      });
    }
  }

  /** Run one job if it is still queued (or, taken again from pg-boss, left running by a vanished server). */
  private async execute(id: string, mayReclaim: boolean): Promise<void> {
    let claimed = await claimJob(id, this.serverId);
    if (!claimed && mayReclaim) claimed = await reclaimJob(id, this.serverId);
    if (!claimed) return;
    const row = await findJob(id);
    if (!row) return;
    const envelope = parseJson<JobEnvelope | null>(row.inputJson, null);
    if (!envelope) {
      await finishJob(id, this.serverId, { status: 'failed', error: { code: 'internal', message: 'the job input could not be read', field: null } });
      return;
    }
    const flag = stopFlag();
    const abort = new AbortController();
    let cancelled = false;
    let grace: NodeJS.Timeout | undefined;
    const cancel = () => {
      if (cancelled) return;
      cancelled = true;
      requestStop(flag);
      if (!COOPERATIVE.has(envelope.task)) abort.abort();
      else grace = setTimeout(() => abort.abort(), this.options.stopGraceMs).unref();
    };
    this.running.set(id, { cancel });

    const progress: { pending: { fraction: number; message: string } | null; last: string } = { pending: null, last: '' };
    let lastWrite = 0;
    let busy = false;
    const tick = async () => {
      if (busy) return;
      busy = true;
      try {
        const p = progress.pending;
        if (p && Date.now() - lastWrite >= this.options.progressIntervalMs) {
          progress.pending = null;
          lastWrite = Date.now();
          await reportProgress(id, p.fraction, p.message);
        }
        if (!cancelled && (await isCancelRequested(id))) cancel();
      } catch (e) {
        console.error('[saltus] job progress write failed', e);
      } finally {
        busy = false;
      }
    };
    const timer = setInterval(() => void tick(), this.options.cancelPollMs);

    let end: JobEnd;
    try {
      const out = await runInPool(envelope.task, envelope.input, {
        stop: flag,
        signal: abort.signal,
        onProgress: (fraction, message) => {
          progress.pending = { fraction, message };
          progress.last = message;
        },
      });
      if (out.stopped) {
        end = { status: 'cancelled', result: out.result, message: 'cancelled; the best result found so far is kept' };
      } else {
        const finisher = envelope.after ? this.options.finishers?.[envelope.after.type] : undefined;
        const result = finisher ? await finisher(envelope, out.result, { id, createdBy: row.createdBy }) : out.result;
        end = { status: 'done', result, message: progress.last || 'done' };
      }
    } catch (e) {
      if (cancelled) {
        end = { status: 'cancelled', message: 'cancelled before a result was found' };
      } else {
        end = { status: 'failed', error: jobError(e) };
        end.message = end.error!.message;
      }
    } finally {
      clearInterval(timer);
      clearTimeout(grace);
      this.running.delete(id);
    }
    // Wait for a progress write in flight so it cannot land after the final state.
    while (busy) await new Promise((r) => setTimeout(r, 5));
    await finishJob(id, this.serverId, end);
  }
}

function jobError(e: unknown): JobError {
  // By name too: under the Next.js server the runner's modules may be another copy than the route's.
  if (isDomainError(e) || (e instanceof Error && e.name === 'DomainError')) {
    const d = e as Error & { code: string; field?: string };
    return { code: d.code, message: d.message, field: d.field ?? null };
  }
  console.error('[saltus] job failed', e);
  return { code: 'internal', message: 'the computation failed unexpectedly; the server log has the details', field: null };
}

