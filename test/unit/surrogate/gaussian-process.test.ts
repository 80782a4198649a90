import { describe, expect, it } from 'vitest';
import { Matrix, inverse, determinant } from 'ml-matrix';
import { fitGaussianProcess, logMarginalLikelihood, predict, leaveOneOutResiduals, correlation, type KernelKind } from '@/domain/surrogate';
import { seededRandom } from '@/domain/random';

// Small training set: two numeric coordinates and one categorical (3 levels), response from a smooth formula.
function trainingSet(n: number, seed: number) {
  const rng = seededRandom(seed);
  const x: number[][] = [];
  const y: number[] = [];
  for (let i = 0; i < n; i++) {
    const row = [2 * rng.next() - 1, 2 * rng.next() - 1, i % 3];
    x.push(row);
    y.push(Math.sin(2 * row[0]!) + 0.5 * row[1]! ** 2 + 0.3 * row[2]! + 0.05 * (rng.next() - 0.5));
  }
  return { x, y };
}
const categorical = [false, false, true];

function kernelValue(kind: KernelKind, a: number[], b: number[], ls: number[], sf2: number): number {
  let r2 = 0;
  for (let k = 0; k < a.length; k++) {
    const d2 = categorical[k] ? (a[k] === b[k] ? 0 : 1) : (a[k]! - b[k]!) ** 2;
    r2 += d2 / ls[k]! ** 2;
  }
  return sf2 * correlation(kind, r2);
}

describe('Gaussian-process posterior against the closed form (Rasmussen & Williams 2006, eqs. 2.25-2.26)', () => {
  const { x, y } = trainingSet(15, 2);
  const ls = [0.6, 1.3, 0.8];
  const sf2 = 1.7;
  const sn2 = 0.04;
  for (const kind of ['matern52', 'squared-exponential'] as const) {
    it(`mean, variance and log marginal likelihood with fixed hyperparameters (${kind})`, () => {
      const model = fitGaussianProcess(x, y, { kernel: kind, categorical, normalize: false, fixed: { lengthScales: ls, signalVariance: sf2, noiseVariance: sn2 } });
      const n = x.length;
      const K = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) K.set(i, j, kernelValue(kind, x[i]!, x[j]!, ls, sf2) + (i === j ? sn2 : 0));
      const Kinv = inverse(K);
      const yv = Matrix.columnVector(y);
      const alpha = Kinv.mmul(yv);
      const lml = -0.5 * yv.transpose().mmul(alpha).get(0, 0) - 0.5 * Math.log(determinant(K)) - 0.5 * n * Math.log(2 * Math.PI);
      expect(model.logMarginalLikelihood).toBeCloseTo(lml, 7);
      for (const p of [[0.1, -0.4, 1], [0.9, 0.9, 0], [-0.7, 0.2, 2]]) {
        const ks = Matrix.columnVector(x.map((xi) => kernelValue(kind, p, xi, ls, sf2)));
        const mean = ks.transpose().mmul(alpha).get(0, 0);
        const variance = sf2 - ks.transpose().mmul(Kinv).mmul(ks).get(0, 0);
        const pr = predict(model, p);
        expect(pr.mean).toBeCloseTo(mean, 8);
        expect(pr.sd).toBeCloseTo(Math.sqrt(variance), 8);
      }
    });
  }

  it('leave-one-out residuals equal refits without each point', () => {
    const model = fitGaussianProcess(x, y, { categorical, normalize: false, fixed: { lengthScales: ls, signalVariance: sf2, noiseVariance: sn2 } });
    const loo = leaveOneOutResiduals(model);
    for (const i of [0, 7, 14]) {
      const xs = x.filter((_, j) => j !== i);
      const ys = y.filter((_, j) => j !== i);
      const m = fitGaussianProcess(xs, ys, { categorical, normalize: false, fixed: { lengthScales: ls, signalVariance: sf2, noiseVariance: sn2 } });
      const p = predict(m, x[i]!);
      expect(loo.residual[i]).toBeCloseTo(y[i]! - p.mean, 8);
      expect(loo.sd[i]).toBeCloseTo(Math.sqrt(p.sd ** 2 + sn2), 8);
    }
  });
});

describe('log marginal likelihood gradient against central finite differences', () => {
  const { x, y } = trainingSet(20, 9);
  for (const kind of ['matern52', 'squared-exponential'] as const) {
    it(kind, () => {
      const theta = [Math.log(0.5), Math.log(1.2), Math.log(0.7), Math.log(1.3), Math.log(0.02)];
      const { gradient } = logMarginalLikelihood(x, y, theta, { kernel: kind, categorical });
      const h = 1e-5;
      for (let k = 0; k < theta.length; k++) {
        const up = theta.slice();
        const down = theta.slice();
        up[k] = up[k]! + h;
        down[k] = down[k]! - h;
        const fd = (logMarginalLikelihood(x, y, up, { kernel: kind, categorical }).value - logMarginalLikelihood(x, y, down, { kernel: kind, categorical }).value) / (2 * h);
        expect(gradient[k]).toBeCloseTo(fd, 4);
      }
    });
  }
});

describe('hyperparameter estimation', () => {
  it('finds a likelihood at least as high as every start, recovers the noise level and is deterministic', () => {
    const rng = seededRandom(4);
    const x: number[][] = [];
    const y: number[] = [];
    // Replicated design: 15 settings, 3 replicates each, noise sd 0.1.
    for (let i = 0; i < 15; i++) {
      const p = [2 * rng.next() - 1, 2 * rng.next() - 1];
      for (let r = 0; r < 3; r++) {
        x.push(p);
        const u1 = Math.max(rng.next(), 1e-12);
        const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * rng.next());
        y.push(Math.sin(2 * p[0]!) + p[1]! + 0.1 * z);
      }
    }
    const model = fitGaussianProcess(x, y, { seed: 3 });
    expect(Math.sqrt(model.noiseVariance)).toBeGreaterThan(0.05);
    expect(Math.sqrt(model.noiseVariance)).toBeLessThan(0.2);
    const defaultStart = logMarginalLikelihood(x, y.map((v) => (v - model.yMean) / model.yScale), [Math.log(0.7), Math.log(0.7), 0, Math.log(0.05)]);
    expect(model.logMarginalLikelihoodStandardised).toBeGreaterThanOrEqual(defaultStart.value);
    const again = fitGaussianProcess(x, y, { seed: 3 });
    expect(again.theta).toEqual(model.theta);
  });

  it('names the problem when there is too little data', () => {
    expect(() => fitGaussianProcess([[0]], [1])).toThrow(/at least two/);
  });
});
