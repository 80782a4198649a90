/**
 * Surrogate benchmarks: a GP fit with hyperparameters on n = 500, d = 6 against scikit-learn's
 * GaussianProcessRegressor on the same data in the same run (same kernel family, bounds, normalisation
 * and number of optimiser starts); a batch of 8 suggestions from 200 trials; and the Float64Array Cholesky
 * kernel against ml-matrix's, the reason the surrogate keeps its own.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { fitGaussianProcess, suggestTrials, type GaussianProcessModel, type SuggestionRequest } from '../../src/domain/surrogate';
import { choleskyInPlace } from '../../src/domain/surrogate/linear-algebra';
import { seededRandom } from '../../src/domain/random';
import type { Factor } from '../../src/domain/factors';
import type { BenchCase } from '../types';

const frac = (v: number) => v - Math.floor(v);

/** The same deterministic data as bench/reference/surrogate_gp_fit.py. */
export function benchData(n: number, d: number): { x: number[][]; y: number[] } {
  const x: number[][] = [];
  const y: number[] = [];
  for (let i = 0; i < n; i++) {
    const r: number[] = [];
    for (let j = 0; j < d; j++) r.push(2 * frac(Math.sin((i + 1) * 12.9898 + (j + 1) * 78.233) * 43758.5453) - 1);
    x.push(r);
    let s = Math.sin(3 * r[0]!) + r[1]! ** 2;
    if (d > 3) s += -0.5 * r[2]! * r[3]!;
    if (d > 4) s += 0.2 * Math.cos(5 * r[4]!);
    if (d > 5) s += 0.1 * r[5]!;
    s += 0.1 * (frac(Math.sin((i + 1) * 7.13) * 1000) - 0.5);
    y.push(s);
  }
  return { x, y };
}

// Invented scenario for the batch case: hop height against payload, gain, preload and surface.
const factors: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'discrete', values: [10, 15, 20, 25, 30] },
  { name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'glass', 'sand', 'ice'] },
];

function batchRequest(): SuggestionRequest {
  const rng = seededRandom(77);
  const bonus: Record<string, number> = { turf: 0, glass: 6, sand: -4, ice: -8 };
  const data = Array.from({ length: 200 }, (_, i) => {
    const payload = 2 * rng.next();
    const gain = [10, 15, 20, 25, 30][i % 5]!;
    const preload = 1 + 4 * rng.next();
    const surface = ['turf', 'glass', 'sand', 'ice'][Math.floor(i / 5) % 4]!;
    const height = 40 - 10 * (payload - 0.6) ** 2 + 0.3 * gain - 0.006 * gain * gain + 4 * preload - 0.5 * preload * preload + bonus[surface]! + (rng.next() - 0.5);
    return { payload, gain, preload, surface, height };
  });
  return { factors, data, response: 'height', goal: 'maximize', count: 8, seed: 3 };
}

let lastFit: GaussianProcessModel | null = null;

export const cases: BenchCase[] = [
  {
    name: 'surrogate: GP fit n=500 d=6 (Matérn 5/2 ARD + noise, 2 starts)',
    target: 'no slower than scikit-learn; LML ≥ its value − 0.1',
    setup: () => benchData(500, 6),
    run: (prepared) => {
      const { x, y } = prepared as ReturnType<typeof benchData>;
      lastFit = fitGaussianProcess(x, y, { kernel: 'matern52', starts: 2, seed: 1 });
      return lastFit;
    },
    warmup: 0,
    repeats: 1,
    report: () => ({
      logMarginalLikelihood: Number(lastFit!.logMarginalLikelihoodStandardised.toFixed(4)),
      noiseVariance: lastFit!.noiseVariance / lastFit!.yScale ** 2,
      starts: lastFit!.optimisation?.starts ?? 0,
      likelihoodEvaluations: lastFit!.optimisation?.evaluations ?? 0,
      gradientEvaluations: lastFit!.optimisation?.gradientEvaluations ?? 0,
    }),
    reference: { script: 'surrogate_gp_fit.py', args: ['500', '6', '1'], label: 'scikit-learn GaussianProcessRegressor', maxRatio: 1 },
  },
  {
    name: 'surrogate: batch of 8 suggestions from n=200 (fit included)',
    target: '≤ 2 s',
    targetSeconds: 2,
    setup: batchRequest,
    run: (prepared) => suggestTrials(prepared as SuggestionRequest),
    warmup: 1,
    repeats: 3,
    // CPU seconds of one run: on a shared, loaded machine wall time overstates the work.
    report: (prepared) => {
      const c0 = process.cpuUsage();
      suggestTrials(prepared as SuggestionRequest);
      const c = process.cpuUsage(c0);
      return { cpuSeconds: (c.user + c.system) / 1e6 };
    },
  },
  {
    name: 'surrogate: Cholesky n=500, own Float64Array kernel',
    setup: () => {
      const { x } = benchData(500, 6);
      const n = x.length;
      const a = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        let r2 = 0;
        for (let k = 0; k < 6; k++) r2 += (x[i]![k]! - x[j]![k]!) ** 2;
        a[i * n + j] = Math.exp(-r2) + (i === j ? 0.01 : 0);
      }
      return { a, n };
    },
    run: (prepared) => {
      const { a, n } = prepared as { a: Float64Array; n: number };
      const copy = Float64Array.from(a);
      choleskyInPlace(copy, n);
      return copy;
    },
    report: (prepared) => {
      const { a, n } = prepared as { a: Float64Array; n: number };
      const m = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, a[i * n + j]!);
      new CholeskyDecomposition(m);
      const times: number[] = [];
      for (let r = 0; r < 3; r++) {
        const t0 = performance.now();
        new CholeskyDecomposition(m);
        times.push((performance.now() - t0) / 1000);
      }
      times.sort((p, q) => p - q);
      return { mlMatrixCholeskySeconds: times[1]! };
    },
  },
];
