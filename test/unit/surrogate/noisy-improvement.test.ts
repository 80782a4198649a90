import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix, inverse } from 'ml-matrix';
import { correlation, fitGaussianProcess } from '@/domain/surrogate';
import { NoisyImprovement, noiseIsNegligible, noisyExpectedImprovement, stratifiedNormals } from '@/domain/surrogate/noisy-improvement';
import { randomNormal, seededRandom } from '@/domain/random';

// Invented noisy 1-D data with a replicated setting: response peaks near x = 0.3.
const x = [[-0.9], [-0.5], [-0.1], [0.2], [0.2], [0.5], [0.8]];
const y = [0.1, 0.55, 0.8, 1.05, 0.85, 0.9, 0.4];
const ls = 0.45;
const sf2 = 0.3;
const sn2 = 0.02;
const k = (a: number, b: number) => sf2 * correlation('matern52', ((a - b) / ls) ** 2);

/** Plain Monte Carlo: joint posterior draws of (f(X distinct), f(x)), improvement max(f(x) − max f(X), 0) averaged. */
function bruteForce(point: number, sign: 1 | -1, draws: number, seed: number): number {
  const xs = x.map((r) => r[0]!);
  const distinct = [...new Set(xs)];
  const all = [...distinct, point];
  const n = xs.length;
  const K = new Matrix(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) K.set(i, j, k(xs[i]!, xs[j]!) + (i === j ? sn2 : 0));
  const Kinv = inverse(K);
  const Ks = new Matrix(all.length, n);
  for (let i = 0; i < all.length; i++) for (let j = 0; j < n; j++) Ks.set(i, j, k(all[i]!, xs[j]!));
  const Kss = new Matrix(all.length, all.length);
  for (let i = 0; i < all.length; i++) for (let j = 0; j < all.length; j++) Kss.set(i, j, k(all[i]!, all[j]!) + (i === j ? 1e-10 : 0));
  const mean = Ks.mmul(Kinv).mmul(Matrix.columnVector(y));
  const raw = Kss.sub(Ks.mmul(Kinv).mmul(Ks.transpose()));
  const cov = new Matrix(all.length, all.length);
  for (let i = 0; i < all.length; i++) for (let j = 0; j < all.length; j++) cov.set(i, j, 0.5 * (raw.get(i, j) + raw.get(j, i)) + (i === j ? 1e-10 : 0));
  const L = new CholeskyDecomposition(cov).lowerTriangularMatrix;
  const rng = seededRandom(seed);
  const m = all.length;
  const z = new Float64Array(m);
  let total = 0;
  for (let t = 0; t < draws; t++) {
    for (let i = 0; i < m; i++) z[i] = randomNormal(rng);
    let best = -Infinity;
    let at = 0;
    for (let i = 0; i < m; i++) {
      let v = mean.get(i, 0);
      for (let j = 0; j <= i; j++) v += L.get(i, j) * z[j]!;
      v *= sign;
      if (i < m - 1) best = Math.max(best, v);
      else at = v;
    }
    total += Math.max(at - best, 0);
  }
  return total / draws;
}

describe('noisy expected improvement (Letham et al. 2019) against brute-force Monte Carlo', () => {
  const model = fitGaussianProcess(x, y, { normalize: false, fixed: { lengthScales: [ls], signalVariance: sf2, noiseVariance: sn2 } });

  it('agrees with 200 000 plain joint posterior draws, maximising and minimising', () => {
    const cases = [
      { goal: 'maximize', sign: 1, points: [[0.35], [-0.3]] },
      { goal: 'minimize', sign: -1, points: [[-0.95], [-0.7]] },
    ] as const;
    for (const { goal, sign, points } of cases) {
      const ours = noisyExpectedImprovement(model, points, goal, seededRandom(5), 4096);
      points.forEach((p, i) => {
        const ref = bruteForce(p[0]!, sign, 200_000, 11 + i);
        // Both are estimates: a few per cent apart at most (relative standard errors about 1-2 % each).
        expect(Math.abs(ours[i]! - ref)).toBeLessThan(0.08 * ref);
      });
    }
  });

  it('the default number of stratified draws stays within 20 % of the reference for every seed tried', () => {
    const ref = bruteForce(0.35, 1, 200_000, 3);
    for (let seed = 1; seed <= 8; seed++) {
      const ours = noisyExpectedImprovement(model, [[0.35]], 'maximize', seededRandom(seed))[0]!;
      expect(Math.abs(ours - ref)).toBeLessThan(0.2 * ref);
    }
  });

  it('is zero at an observed setting (the incumbent is the noiseless value itself) and reproducible for a seed', () => {
    const [atObserved] = noisyExpectedImprovement(model, [[0.2]], 'maximize', seededRandom(1));
    expect(atObserved!).toBeLessThan(1e-4);
    const a = noisyExpectedImprovement(model, [[0.4], [-0.7]], 'maximize', seededRandom(4));
    const b = noisyExpectedImprovement(model, [[0.4], [-0.7]], 'maximize', seededRandom(4));
    expect(a).toEqual(b);
  });

  it('a chosen trial lowers the value of its neighbourhood for the next pick', () => {
    const pool = [[0.35], [0.4], [-0.3]].map((p) => Float64Array.from(p));
    const nei = new NoisyImprovement(model, 1, pool, 2, seededRandom(2));
    const before = [0, 1, 2].map((c) => nei.logScore(c));
    nei.add(pool[0]!);
    const after = [0, 1, 2].map((c) => nei.logScore(c));
    expect(after[1]!).toBeLessThan(before[1]!);
    expect(after[0]!).toBeLessThan(before[0]! - 2);
    expect(Math.abs(nei.logScoreAt(pool[2]!) - after[2]!)).toBeLessThan(1e-9);
  });

  it('noise is negligible below a noise variance of 0.1 % of the response variance', () => {
    expect(noiseIsNegligible(model)).toBe(false);
    const smooth = fitGaussianProcess([[0], [0.5], [1]], [0, 1, 0], { fixed: { lengthScales: [0.5], signalVariance: 1, noiseVariance: 1e-6 } });
    expect(noiseIsNegligible(smooth)).toBe(true);
  });

  it('stratified normal draws: one per stratum in every row', () => {
    const z = stratifiedNormals(3, 16, seededRandom(1));
    for (let r = 0; r < 3; r++) {
      const strata = Array.from(z.subarray(r * 16, r * 16 + 16), (v) => Math.floor(16 * (0.5 * (1 + erf(v / Math.SQRT2)))));
      expect(new Set(strata).size).toBe(16);
    }
  });
});

function erf(v: number): number {
  // Abramowitz & Stegun 7.1.26 (max error 1.5e-7), enough to recover the strata.
  const t = 1 / (1 + 0.3275911 * Math.abs(v));
  const yv = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-v * v);
  return v >= 0 ? yv : -yv;
}
