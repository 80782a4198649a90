/**
 * The computation pool: worker threads (piscina) that run the pure domain computations of `tasks.ts`,
 * so a design search or a surrogate fit never blocks the web server's event loop. Progress comes back
 * through a MessageChannel; a stop request is a flag in a SharedArrayBuffer the search reads between
 * passes; an abort signal ends a task that cannot stop by itself (its thread is replaced).
 */
import os from 'node:os';
import path from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import { fromTaskError, type TaskKind, type TaskOutcome } from './tasks';

/**
 * The worker entry, found from the project root (the server's working directory, or SALTUS_ROOT): the
 * Next.js server bundle cannot carry a worker file, so the pool points at the source tree's plain .mjs.
 */
export function workerFile(env: Record<string, string | undefined> = process.env): string {
  if (env.SALTUS_JOB_WORKER) return path.resolve(env.SALTUS_JOB_WORKER);
  return path.join(path.resolve(/*turbopackIgnore: true*/ env.SALTUS_ROOT ?? process.cwd()), 'src', 'server', 'jobs', 'worker.mjs');
}

/** Jobs at once: SALTUS_JOB_THREADS, else one fewer than the cores (at least one) so requests keep a core. */
export function poolThreads(env: Record<string, string | undefined> = process.env): number {
  const set = Number(env.SALTUS_JOB_THREADS);
  if (Number.isInteger(set) && set >= 1 && set <= 64) return set;
  return Math.max(1, os.availableParallelism() - 1);
}

const globalForPool = globalThis as unknown as { saltusPool?: Piscina };

/**
 * The pool has one thread more than the job runner runs jobs at once (`poolThreads()`), so a request
 * that waits for its computation (POST /api/v1/designs, …) never queues behind long jobs.
 */
export function pool(): Piscina {
  globalForPool.saltusPool ??= new Piscina({
    filename: workerFile(),
    // One thread stays loaded (a thread takes about a second to load the domain code); others that
    // were started live ten minutes idle.
    minThreads: 1,
    maxThreads: poolThreads() + 1,
    idleTimeout: 10 * 60_000,
  });
  return globalForPool.saltusPool;
}

export async function closePool(): Promise<void> {
  const p = globalForPool.saltusPool;
  globalForPool.saltusPool = undefined;
  if (p) await p.destroy();
}

export interface PoolRunOptions {
  onProgress?: (fraction: number, message: string) => void;
  /** Int32Array over a SharedArrayBuffer: cell 0 set to 1 asks the search to stop with its best so far. */
  stop?: Int32Array;
  /** Ends the task outright (its worker thread is terminated). */
  signal?: AbortSignal;
}

export function stopFlag(): Int32Array {
  return new Int32Array(new SharedArrayBuffer(4));
}

export function requestStop(flag: Int32Array): void {
  Atomics.store(flag, 0, 1);
}

/** Run a task in the pool; resolves with its result, rejects with its DomainError (or an Error). */
export async function runInPool(kind: TaskKind, input: unknown, options: PoolRunOptions = {}): Promise<{ result: unknown; stopped: boolean }> {
  let port: MessageChannel | null = null;
  const task: Record<string, unknown> = { kind, input, stop: options.stop };
  const transferList = [];
  if (options.onProgress) {
    port = new MessageChannel();
    const report = options.onProgress;
    port.port1.on('message', (m: { fraction: number; message: string }) => report(m.fraction, m.message));
    task.port = port.port2;
    transferList.push(port.port2);
  }
  try {
    const outcome = (await pool().run(task, { transferList, signal: options.signal ?? null })) as TaskOutcome;
    if (!outcome.ok) throw fromTaskError(outcome.error);
    return { result: outcome.result, stopped: outcome.stopped };
  } finally {
    // Let the last progress messages arrive before the port closes.
    if (port) setImmediate(() => port!.port1.close());
  }
}
