/**
 * The least-squares triangle on two threads: the same bits as one thread (fixed blocks folded in
 * order), and an answer (the same one) when the helper is slow, silent or gone. Deterministic data
 * from fixed formulas (common practice, no source).
 */
import { Worker } from 'node:worker_threads';
import { afterAll, describe, expect, it } from 'vitest';
import { leastSquares } from '@/domain/analysis';
import { largeTriangle, sequentialBlockTriangle, setTriangleRunner } from '@/domain/analysis/tall-qr';
import { stopAnalysisThreads, triangleOnThreads, startAnalysisThreads } from '@/server/compute/triangle-threads';

const N = 50_001;
const P = 9;
function shared(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * 8));
}
const x = shared(N * P);
for (let j = 0; j < P; j++) for (let i = 0; i < N; i++) x[j * N + i] = j === 0 ? 1 : Math.cos(0.0013 * (i + 1) * (j + 0.7) + j);
const y = shared(N);
for (let i = 0; i < N; i++) {
  let s = 0.02 * Math.sin(31.7 * (i + 1));
  for (let j = 0; j < P; j++) s += (j - 4) * 0.25 * x[j * N + i]!;
  y[i] = s;
}

const sameBits = (a: Float64Array, b: Float64Array) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

afterAll(async () => {
  await stopAnalysisThreads();
});

describe('least-squares triangle on two threads', () => {
  it('gives the same bits as the blocks on one thread, and the same fit', async () => {
    setTriangleRunner(null);
    const one = sequentialBlockTriangle(x, y, N, P);
    const fitOne = leastSquares(x, y, N, P);
    await startAnalysisThreads({ SALTUS_ANALYSIS_THREADS: '2' });
    for (let r = 0; r < 3; r++) expect(sameBits(largeTriangle(x, y, N, P), one)).toBe(true);
    const fitTwo = leastSquares(x, y, N, P);
    expect(sameBits(fitTwo.coefficients, fitOne.coefficients)).toBe(true);
    expect(fitTwo.residualSumOfSquares).toBe(fitOne.residualSumOfSquares);
  });

  it('copies unshared arrays and still agrees', async () => {
    await startAnalysisThreads({ SALTUS_ANALYSIS_THREADS: '2' });
    const plainX = Float64Array.from(x);
    const plainY = Float64Array.from(y);
    expect(sameBits(largeTriangle(plainX, plainY, N, P), sequentialBlockTriangle(x, y, N, P))).toBe(true);
  });

  it('forms every block itself when the helper never answers', async () => {
    const silent = new Worker('setInterval(() => {}, 1000)', { eval: true });
    try {
      const t = triangleOnThreads(silent, x, y, N, P, 200);
      expect(sameBits(t, sequentialBlockTriangle(x, y, N, P))).toBe(true);
    } finally {
      await silent.terminate();
    }
  });

  it('forms again a block the helper claimed and never finished, after the wait', async () => {
    // This helper claims one block, marks itself active and then stops working.
    const stuck = new Worker(
      `const { parentPort } = require('node:worker_threads');
       parentPort.on('message', ({ ctrl }) => {
         Atomics.store(ctrl, 1, 1);
         const b = Atomics.add(ctrl, 0, 1);
         parentPort.postMessage(b);
       });
       parentPort.postMessage('ready');`,
      { eval: true },
    );
    const claimed: number[] = [];
    try {
      await new Promise((resolve) => stuck.once('message', resolve));
      stuck.on('message', (b: number) => claimed.push(b));
      const t0 = performance.now();
      const t = triangleOnThreads(stuck, x, y, N, P, 300);
      const waited = performance.now() - t0;
      expect(sameBits(t, sequentialBlockTriangle(x, y, N, P))).toBe(true);
      await new Promise((resolve) => setTimeout(resolve, 50));
      // Whether the helper got a block before the caller took them all depends on the scheduler;
      // when it did, the caller waited for it and then formed that block itself.
      if (claimed.length === 1 && claimed[0]! < 7) expect(waited).toBeGreaterThanOrEqual(250);
    } finally {
      await stuck.terminate();
    }
  });

  it('keeps a late helper from spoiling the answer: a block it is still writing is formed again apart', async () => {
    // This helper claims one block and then keeps writing NaN into that block's slot for a second.
    const late = new Worker(
      `const { parentPort } = require('node:worker_threads');
       parentPort.on('message', ({ ctrl, out, p, blocks }) => {
         Atomics.store(ctrl, 1, 1);
         const b = Atomics.add(ctrl, 0, 1);
         parentPort.postMessage(b);
         if (b >= blocks) return;
         const qq = (p + 1) * (p + 1);
         const until = Date.now() + 1000;
         while (Date.now() < until) out.fill(NaN, b * qq, (b + 1) * qq);
       });
       parentPort.postMessage('ready');`,
      { eval: true },
    );
    try {
      await new Promise((resolve) => late.once('message', resolve));
      for (let attempt = 0; attempt < 3; attempt++) {
        const t = triangleOnThreads(late, x, y, N, P, 100);
        expect(sameBits(t, sequentialBlockTriangle(x, y, N, P))).toBe(true);
        await new Promise((resolve) => setTimeout(resolve, 1100));
      }
    } finally {
      await late.terminate();
    }
  });

  it('stays on one thread when told to (SALTUS_ANALYSIS_THREADS=1) and after the helper stops', async () => {
    await startAnalysisThreads({ SALTUS_ANALYSIS_THREADS: '1' });
    expect(sameBits(largeTriangle(x, y, N, P), sequentialBlockTriangle(x, y, N, P))).toBe(true);
    await stopAnalysisThreads();
    expect(sameBits(largeTriangle(x, y, N, P), sequentialBlockTriangle(x, y, N, P))).toBe(true);
  });
});
