import { Matrix, QrDecomposition } from 'ml-matrix';
import type { BenchCase } from '../types';
import { analyze, buildModelFrame, fitLinearModel, type AnalysisResult, type LinearModelFit, type ModelFrame } from '../../src/domain/analysis';
import { chunkedTriangle, setTriangleRunner } from '../../src/domain/analysis/tall-qr';
import { analysisThreads, startAnalysisThreads } from '../../src/server/compute/triangle-threads';

/**
 * OLS with ANOVA on 100,000 runs × 30 terms (intercept + 29 predictors). The data come from a
 * fixed formula that bench/reference/analysis_ols.py evaluates identically:
 *   x_j(i) = sin(0.001·(i + 1)·(j + 1.3) + j),  j = 1..29
 *   y(i)   = Σ_j ((j mod 7) − 3)/10 · x_j(i) + 0.1·sin(12.9898·(i + 1))
 * The reference script times statsmodels OLS (coefficients, standard errors, t, p, intervals,
 * overall and per-term F) and numpy's lstsq on the prebuilt matrix, and (with `records`) both again
 * starting from the same 100,000 records through a pandas DataFrame.
 *
 * The fits use what the server uses: the least-squares triangle on two threads (the calling thread and
 * one helper, `src/server/compute/triangle-threads.ts`; SALTUS_ANALYSIS_THREADS=1 for one), as numpy's
 * LAPACK uses the machine's two cores. `cpu=` is the processor time of all threads of the process, as
 * the reference's `cpu_seconds` is of all of Python's. The one-thread time is reported beside it.
 */
const N = 100_000;
const P = 29;

function makeData(): Record<string, number>[] {
  const rows: Record<string, number>[] = new Array(N);
  for (let i = 0; i < N; i++) {
    const row: Record<string, number> = {};
    let y = 0.1 * Math.sin(12.9898 * (i + 1));
    for (let j = 1; j <= P; j++) {
      const x = Math.sin(0.001 * (i + 1) * (j + 1.3) + j);
      row[`x${j}`] = x;
      y += (((j % 7) - 3) / 10) * x;
    }
    row.y = y;
    rows[i] = row;
  }
  return rows;
}

const terms = Array.from({ length: P }, (_, j) => `x${j + 1}`);

const reference = {
  script: 'analysis_ols.py',
  label: 'statsmodels OLS + per-term F, given the model matrix',
  maxRatio: 1,
  compare: [{ key: 'lstsq_seconds', label: 'numpy lstsq, given the model matrix (same run)', maxRatio: 3 }],
};

const fromRecords = {
  script: 'analysis_ols.py',
  args: ['records'],
  label: 'statsmodels OLS + per-term F, from the same records via pandas',
  maxRatio: 1,
  compare: [{ key: 'lstsq_seconds', label: 'numpy lstsq, from the same records via pandas (same run)' }],
};

/** The server's threads for the fit, ready before timing starts. */
async function withThreads<T>(make: () => T): Promise<T> {
  await startAnalysisThreads();
  return make();
}

/** Median seconds of `fn` over `repeats` calls with the triangle on this thread only. */
function oneThreadSeconds(fn: () => unknown, repeats = 5): number {
  setTriangleRunner(null);
  try {
    const times: number[] = [];
    for (let r = 0; r < repeats; r++) {
      const t0 = performance.now();
      fn();
      times.push((performance.now() - t0) / 1000);
    }
    return median(times);
  } finally {
    void startAnalysisThreads();
  }
}

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[s.length >> 1]!;
}

export const cases: BenchCase[] = [
  {
    // The target, like for like: both sides are given the model matrix.
    name: 'analysis: OLS + ANOVA, 100,000 × 30, from a built model matrix',
    target: 'faster than statsmodels, ≤ 3× numpy lstsq',
    setup: () => withThreads(() => buildModelFrame({ data: makeData(), response: 'y', terms })),
    run: (frame) => fitLinearModel(frame as ModelFrame),
    // V8 optimises the kernels (on both threads) over the first several large fits of a process,
    // which take up to 1.5× as long; the server that keeps running is the warm case.
    warmup: 8,
    repeats: 11,
    reference,
    report: (frame, last) => {
      const lm = last as LinearModelFit;
      return {
        rSquared: lm.rSquared,
        factorisation: lm.fit.factorisation ?? '',
        threads: analysisThreads(),
        oneThreadSeconds: oneThreadSeconds(() => fitLinearModel(frame as ModelFrame)),
      };
    },
  },
  {
    // What POST /api/v1/analyses does after validation: rows → model matrix → fit → ANOVA. Compared
    // with statsmodels starting from the same records (a DataFrame from them, then OLS).
    name: 'analysis: OLS + ANOVA, 100,000 runs × 30 terms, from row records',
    target: 'faster than statsmodels from the same records',
    setup: () => withThreads(makeData),
    run: (data) => analyze({ data: data as Record<string, number>[], response: 'y', terms, diagnostics: false }),
    warmup: 1,
    repeats: 5,
    reference: fromRecords,
    report: (_, last) => {
      const r = last as AnalysisResult;
      return { rSquared: r.rSquared, b1: r.coefficients[1]!.estimate, residualDf: r.residualDf };
    },
  },
  {
    // Why the least-squares kernel is our own: ml-matrix (the general matrix library we use for
    // small dense work) stores a matrix as one array per row and walks columns across them, and
    // has no column pivoting or rank detection. Timed here: its QR and solve of the same
    // 100,000 × 30 system; reported beside it, the chunked triangle of [X y] on the same data.
    name: 'analysis: QR of the 100,000 × 30 system with ml-matrix (why the kernel is ours)',
    setup: () => {
      const frame = buildModelFrame({ data: makeData(), response: 'y', terms });
      const rows = Array.from({ length: frame.n }, (_, i) => Array.from({ length: frame.p }, (_, j) => frame.x[j * frame.n + i]!));
      return { frame, a: new Matrix(rows), b: Matrix.columnVector(Array.from(frame.y)), seconds: [] as number[] };
    },
    run: (prepared) => {
      const { a, b, seconds } = prepared as { a: Matrix; b: Matrix; seconds: number[] };
      const t0 = performance.now();
      const solution = new QrDecomposition(a).solve(b);
      seconds.push((performance.now() - t0) / 1000);
      return solution;
    },
    warmup: 0,
    repeats: 3,
    report: (prepared) => {
      const { frame, seconds } = prepared as { frame: ModelFrame; seconds: number[] };
      const times: number[] = [];
      for (let r = 0; r < 5; r++) {
        const t0 = performance.now();
        chunkedTriangle(frame.x, frame.y, frame.n, frame.p);
        times.push((performance.now() - t0) / 1000);
      }
      const ours = median(times);
      return { chunkedTriangleSeconds: ours, mlMatrixOverChunked: median(seconds) / ours };
    },
  },
];
