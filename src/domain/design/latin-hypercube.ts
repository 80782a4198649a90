/**
 * Latin hypercube designs optimised for maximin distance: columns are permutations of n levels; an
 * annealing search swaps two levels within a column and keeps the design with the smallest
 * Morris–Mitchell φp = (Σ_{i<j} d_ij^(−p))^(1/p), d the Euclidean distance between runs.
 */
// Morris & Mitchell (1995), J. Statist. Plann. Inference 43:381-402
import { invalidInput } from '../errors';
import { randomInt, shuffled, type RandomSource } from '../random';

/** φp of a design given as integer levels (rows of equal length). */
export function phiP(levels: readonly (readonly number[])[], p = 15): number {
  let s = 0;
  for (let i = 0; i < levels.length; i++) {
    for (let j = i + 1; j < levels.length; j++) {
      let d2 = 0;
      for (let c = 0; c < levels[i]!.length; c++) d2 += (levels[i]![c]! - levels[j]![c]!) ** 2;
      s += Math.pow(d2, -p / 2);
    }
  }
  return Math.pow(s, 1 / p);
}

/** Smallest squared distance between runs, and how many pairs attain it. */
export function minimumDistance(levels: readonly (readonly number[])[]): { squared: number; pairs: number } {
  let best = Infinity;
  let pairs = 0;
  for (let i = 0; i < levels.length; i++) {
    for (let j = i + 1; j < levels.length; j++) {
      let d2 = 0;
      for (let c = 0; c < levels[i]!.length; c++) d2 += (levels[i]![c]! - levels[j]![c]!) ** 2;
      if (d2 < best - 1e-12) {
        best = d2;
        pairs = 1;
      } else if (Math.abs(d2 - best) <= 1e-12) pairs++;
    }
  }
  return { squared: best, pairs };
}

export interface MaximinOptions {
  p?: number;
  /** Annealing restarts (default 4) and swaps per restart (default 600·n·d, at most 200000 and about 3·10^7 / (2·n·d)). */
  restarts?: number;
  iterations?: number;
}

/** n × d integer levels 0..n−1, each column a permutation, optimised for φp. */
export function maximinLatinHypercube(n: number, d: number, rng: RandomSource, options: MaximinOptions = {}): number[][] {
  if (!Number.isInteger(n) || n < 2) throw invalidInput('runs', 'a Latin hypercube needs at least 2 runs');
  const p = options.p ?? 15;
  const restarts = options.restarts ?? 4;
  // Each swap costs about 2·n·d operations: cap the work of a restart near 3·10^7.
  const iterations = options.iterations ?? Math.max(1000, Math.min(200_000, 600 * n * d, Math.floor(3e7 / (2 * n * d))));
  const base = Array.from({ length: n }, (_, i) => i);
  // Work on distances scaled by n so that d^(−p) stays in range for large p.
  const scale = 1 / Math.max(1, n - 1);
  let best: number[][] | null = null;
  let bestPhi = Infinity;
  for (let r = 0; r < restarts; r++) {
    const cols = Array.from({ length: d }, () => shuffled(base, rng));
    const x = Array.from({ length: n }, (_, i) => cols.map((c) => c[i]!));
    const inv = new Float64Array(n * n); // d_ij^(−p)
    let sum = 0;
    const pairTerm = (i: number, j: number) => {
      let d2 = 0;
      const xi = x[i]!;
      const xj = x[j]!;
      for (let c = 0; c < d; c++) {
        const t = (xi[c]! - xj[c]!) * scale;
        d2 += t * t;
      }
      if (p === 15) {
        const d3 = d2 * d2 * d2;
        return 1 / (d3 * d3 * d2 * Math.sqrt(d2));
      }
      return Math.pow(d2, -p / 2);
    };
    const touchedIndex = new Int32Array(2 * n);
    const touchedValue = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) sum += inv[i * n + j] = pairTerm(i, j);
    let current = Math.pow(sum, 1 / p);
    let runBest = current;
    let runBestX = x.map((row) => row.slice());
    let temperature = 0.1 * current;
    const cooling = Math.pow(1e-4, 1 / iterations);
    for (let it = 0; it < iterations; it++) {
      const c = randomInt(rng, d);
      const a = randomInt(rng, n);
      let b = randomInt(rng, n - 1);
      if (b >= a) b++;
      // Swap and update the sum over pairs touching a or b.
      let delta = 0;
      const swap = () => {
        const t = x[a]![c]!;
        x[a]![c] = x[b]![c]!;
        x[b]![c] = t;
      };
      let touched = 0;
      swap();
      for (let k = 0; k < n; k++) {
        if (k === a || k === b) continue;
        for (let side = 0; side < 2; side++) {
          const u = side === 0 ? a : b;
          const i = u < k ? u : k;
          const j = u < k ? k : u;
          const v = pairTerm(i, j);
          touchedIndex[touched] = i * n + j;
          touchedValue[touched++] = v;
          delta += v - inv[i * n + j]!;
        }
      }
      const next = Math.pow(Math.max(sum + delta, 1e-300), 1 / p);
      if (next <= current || rng.next() < Math.exp(-(next - current) / temperature)) {
        for (let t = 0; t < touched; t++) inv[touchedIndex[t]!] = touchedValue[t]!;
        sum += delta;
        current = next;
        if (current < runBest - 1e-12) {
          runBest = current;
          runBestX = x.map((row) => row.slice());
        }
      } else {
        swap();
      }
      temperature *= cooling;
      // Refresh the running sum now and then against rounding drift.
      if ((it & 4095) === 4095) {
        sum = 0;
        for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) sum += inv[i * n + j] = pairTerm(i, j);
        current = Math.pow(sum, 1 / p);
      }
    }
    if (runBest < bestPhi) {
      bestPhi = runBest;
      best = runBestX;
    }
  }
  return best!;
}
