/** Cross-check against scikit-learn's GaussianProcessRegressor (values computed, see SOURCE.md beside this file). */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitGaussianProcess, predict } from '@/domain/surrogate';

interface Fixture {
  x: number[][];
  y: number[];
  testPoints: number[][];
  fixedHyperparameters: { lengthScales: number[]; signalVariance: number; noiseVariance: number };
  fixed: Record<'matern52' | 'squared-exponential', { logMarginalLikelihood: number; mean: number[]; sd: number[] }>;
  fitted: { logMarginalLikelihoodStandardised: number };
}

const fixture = JSON.parse(readFileSync(new URL('./scikit-learn-gp.json', import.meta.url), 'utf8')) as Fixture;

describe('Gaussian process against scikit-learn 1.2.1 GaussianProcessRegressor (computed, SOURCE.md)', () => {
  for (const kernel of ['matern52', 'squared-exponential'] as const) {
    it(`fixed hyperparameters, ${kernel}: log marginal likelihood, mean and sd`, () => {
      const model = fitGaussianProcess(fixture.x, fixture.y, { kernel, normalize: false, fixed: fixture.fixedHyperparameters });
      const ref = fixture.fixed[kernel];
      expect(model.logMarginalLikelihood).toBeCloseTo(ref.logMarginalLikelihood, 6);
      fixture.testPoints.forEach((p, i) => {
        const pr = predict(model, p);
        expect(pr.mean).toBeCloseTo(ref.mean[i]!, 7);
        expect(pr.sd).toBeCloseTo(ref.sd[i]!, 7);
      });
    });
  }

  it('fitted hyperparameters: log marginal likelihood no worse than scikit-learn with 9 starts, less 0.1', () => {
    const model = fitGaussianProcess(fixture.x, fixture.y, { kernel: 'matern52', starts: 4, seed: 1 });
    expect(model.logMarginalLikelihoodStandardised).toBeGreaterThan(fixture.fitted.logMarginalLikelihoodStandardised - 0.1);
  });
});
