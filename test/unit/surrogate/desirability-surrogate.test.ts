import { describe, expect, it } from 'vitest';
import { fitGaussianProcess, predict, suggestTrials } from '@/domain/surrogate';
import { desirability, type DesirabilityResponse } from '@/domain/analysis';
import { codePoint, type Factor } from '@/domain/factors';
import { randomNormal, seededRandom } from '@/domain/random';

// Invented: hop height (maximise, 20..40 mm) and landing tilt (minimise, 2..10 degrees) against preload.
const factors: Factor[] = [{ name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' }];
const responses: DesirabilityResponse[] = [
  { name: 'height', goal: 'maximize', lower: 20, upper: 40 },
  { name: 'tilt', goal: 'minimize', lower: 2, upper: 10 },
];

describe('several responses: one surrogate per response, combined through desirability (Derringer & Suich 1980)', () => {
  it('reports each response surrogate, and the suggestion mean and sd are those of D under them', () => {
    const data = [1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5].map((preload) => ({ preload, height: 15 + 6 * preload, tilt: 1 + 2 * Math.max(0, preload - 3) ** 2 }));
    const r = suggestTrials({ factors, data, response: 'overall', goal: 'maximize', count: 1, seed: 2, responses });
    expect(Object.keys(r.model.responseModels!)).toEqual(['height', 'tilt']);
    expect(r.model.acquisition).toMatch(/one surrogate per response/);
    // Independent check: the same per-response fits, D averaged over 20 000 plain normal draws.
    const x = data.map((d) => codePoint(factors, { preload: d.preload }));
    const fits = responses.map((resp) => fitGaussianProcess(x, data.map((d) => d[resp.name as 'height' | 'tilt']), { seed: 2, starts: 3 }));
    const at = codePoint(factors, { preload: Number(r.suggestions[0]!.values.preload) });
    const preds = fits.map((m) => predict(m, at));
    const rng = seededRandom(9);
    let sum = 0;
    let sum2 = 0;
    const draws = 20_000;
    for (let s = 0; s < draws; s++) {
      const d = desirability({ height: preds[0]!.mean + preds[0]!.sd * randomNormal(rng), tilt: preds[1]!.mean + preds[1]!.sd * randomNormal(rng) }, responses).overall;
      sum += d;
      sum2 += d * d;
    }
    const mean = sum / draws;
    const sd = Math.sqrt(sum2 / draws - mean * mean);
    expect(Math.abs(r.suggestions[0]!.mean - mean)).toBeLessThan(0.02 + 0.1 * sd);
    expect(Math.abs(r.suggestions[0]!.sd - sd)).toBeLessThan(0.02 + 0.2 * sd);
  });

  it('heads out of a region where every observed trial has zero desirability, following the response that is rising', () => {
    // Height rises with preload but is still below its lower limit everywhere tried: D = 0 at every trial,
    // so a single surrogate of D would see a flat zero; the height surrogate sees the trend.
    const rng = seededRandom(3);
    const data = [1, 1.3, 1.6, 1.9, 2.2, 2.5].map((preload) => ({ preload, height: 6 + 5 * preload + 0.2 * randomNormal(rng), tilt: 3 }));
    expect(data.every((d) => desirability({ height: d.height, tilt: d.tilt }, responses).overall === 0)).toBe(true);
    const r = suggestTrials({ factors, data, response: 'overall', goal: 'maximize', count: 2, seed: 5, responses });
    for (const s of r.suggestions) expect(Number(s.values.preload)).toBeGreaterThan(2.7);
  });
});
