/**
 * The least-squares triangle of a large fit on two threads. The domain cuts the rows into fixed
 * blocks and folds the blocks' triangles in order (`sequentialBlockTriangle`); here a helper thread and
 * the calling thread claim blocks from a shared counter and form their triangles side by side, then the
 * caller folds them in the same order, so the result is bit for bit the single-thread one.
 *
 * The call stays synchronous: the caller works on blocks itself and then waits (Atomics.wait) only for
 * a block the helper is still forming. A helper that is busy or not yet started simply claims nothing,
 * and any block it claimed but did not finish is formed again by the caller, so a slow or lost helper
 * costs time, never an answer.
 */
import path from 'node:path';
import * as workerThreads from 'node:worker_threads';
import type { Worker } from 'node:worker_threads';
import { blockCount, blockTriangle, foldTriangles, sequentialBlockTriangle, setTriangleRunner } from '@/domain/analysis/tall-qr';

/**
 * The Worker constructor, taken so that the server bundler does not see `new Worker(…)`: it would
 * bundle triangle-worker.mjs into a chunk where the kernel's source is not found. The helper is the
 * plain file in the source tree, as the job pool's worker is.
 */
const ThreadWorker = Reflect.get(workerThreads, 'Worker') as typeof Worker;

const NEXT = 0;
const ACTIVE = 1;
/** How long the caller waits for a helper's block before forming it itself. */
const HELPER_WAIT_MS = 2_000;

interface HelperState {
  worker: Worker | null;
  ready: boolean;
  loading: Promise<void>;
}

const globalForThreads = globalThis as unknown as { saltusTriangleHelper?: HelperState };

function helperFile(env: Record<string, string | undefined> = process.env): string {
  return path.join(path.resolve(/*turbopackIgnore: true*/ env.SALTUS_ROOT ?? process.cwd()), 'src', 'server', 'compute', 'triangle-worker.mjs');
}

/** Threads for one fit: SALTUS_ANALYSIS_THREADS (1 turns the helper off), else 2. */
export function analysisThreads(env: Record<string, string | undefined> = process.env): number {
  const set = Number(env.SALTUS_ANALYSIS_THREADS);
  return Number.isInteger(set) && set >= 1 ? Math.min(set, 2) : 2;
}

function toShared(a: Float64Array): Float64Array {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const s = new Float64Array(new SharedArrayBuffer(a.length * 8));
  s.set(a);
  return s;
}

/**
 * Block triangles on this thread and the helper `worker` (which runs triangle-worker.mjs's protocol),
 * folded in block order. `waitMs` bounds the wait for a block the helper claimed.
 */
export function triangleOnThreads(worker: Worker | null, x: Float64Array, y: Float64Array, n: number, p: number, waitMs = HELPER_WAIT_MS): Float64Array {
  const blocks = blockCount(n);
  if (!worker || blocks < 2) return sequentialBlockTriangle(x, y, n, p);
  const q = p + 1;
  const qq = q * q;
  const xs = toShared(x);
  const ys = toShared(y);
  const ctrl = new Int32Array(new SharedArrayBuffer(8));
  const done = new Int32Array(new SharedArrayBuffer(4 * blocks));
  const out = new Float64Array(new SharedArrayBuffer(8 * qq * blocks));
  worker.postMessage({ x: xs, y: ys, n, p, blocks, ctrl, done, out });
  for (;;) {
    const b = Atomics.add(ctrl, NEXT, 1);
    if (b >= blocks) break;
    blockTriangle(xs, ys, n, p, b, out.subarray(b * qq, (b + 1) * qq));
    Atomics.store(done, b, 1);
  }
  // Every block is claimed: wait for the helper's last one, then form any it left unfinished.
  const deadline = Date.now() + waitMs;
  while (Atomics.load(ctrl, ACTIVE) === 1) {
    const left = deadline - Date.now();
    if (left <= 0) break;
    Atomics.wait(ctrl, ACTIVE, 1, left);
  }
  // The blocks finished so far, copied: a helper past the deadline may still be writing into its block's
  // slot of `out`, so a block it left unfinished is formed again in the copy, never in the shared slot.
  // The done flags are read before the copy, so a block counted finished was whole when copied.
  const finished = Array.from({ length: blocks }, (_, b) => Atomics.load(done, b) === 1);
  const formed = out.slice();
  for (let b = 0; b < blocks; b++) {
    if (!finished[b]) blockTriangle(xs, ys, n, p, b, formed.subarray(b * qq, (b + 1) * qq));
  }
  return foldTriangles(formed, blocks, p);
}

/**
 * Start the helper thread (once per process) and let large fits use it. Fits run on one thread until
 * the helper has loaded; resolves when it has (or when it could not start, in which case fits stay on
 * one thread).
 */
export function startAnalysisThreads(env: Record<string, string | undefined> = process.env): Promise<void> {
  if (analysisThreads(env) < 2) {
    setTriangleRunner(null);
    return Promise.resolve();
  }
  const existing = globalForThreads.saltusTriangleHelper;
  if (existing) {
    if (existing.ready) install(existing);
    return existing.loading;
  }
  const helper: HelperState = { worker: null, ready: false, loading: Promise.resolve() };
  globalForThreads.saltusTriangleHelper = helper;
  helper.loading = new Promise((resolve) => {
    let worker: Worker;
    try {
      worker = new ThreadWorker(helperFile(env));
    } catch {
      // No thread could be made here: fits stay on this thread.
      resolve();
      return;
    }
    helper.worker = worker;
    worker.unref();
    worker.once('message', (m) => {
      if (m === 'ready') {
        helper.ready = true;
        install(helper);
      }
      resolve();
    });
    worker.once('error', (e) => {
      // The helper could not load (or died): fits stay on this thread.
      console.error('[saltus] the analysis helper thread stopped; large fits use one thread', e);
      retire(helper);
      resolve();
    });
    worker.once('exit', () => {
      retire(helper);
      resolve();
    });
  });
  return helper.loading;
}

/** A helper that has stopped: fits go back to one thread unless a newer helper has taken over. */
function retire(helper: HelperState): void {
  helper.ready = false;
  helper.worker = null;
  if (globalForThreads.saltusTriangleHelper === helper) setTriangleRunner(null);
}

function install(helper: HelperState): void {
  setTriangleRunner((x, y, n, p) => triangleOnThreads(helper.ready ? helper.worker : null, x, y, n, p));
}

/** Threads a large fit uses now: 2 once the helper has loaded, else 1. */
export function analysisThreadsInUse(): number {
  return globalForThreads.saltusTriangleHelper?.ready ? 2 : 1;
}

/** Stop the helper (tests). */
export async function stopAnalysisThreads(): Promise<void> {
  const state = globalForThreads.saltusTriangleHelper;
  globalForThreads.saltusTriangleHelper = undefined;
  setTriangleRunner(null);
  if (state?.worker) await state.worker.terminate();
}
