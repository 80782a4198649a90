import { describe, expect, it } from 'vitest';
import { Matrix, determinant } from 'ml-matrix';
import {
  suggestTrials, fitFeasibility, feasibilityProbability, refineDesignCandidates, fitSurrogate, surrogateSlice, surrogateGrid, predict,
  type SuggestionRequest,
} from '@/domain/surrogate';
import { codePoint, compileModel, standardTerms, type Factor } from '@/domain/factors';
import { seededRandom } from '@/domain/random';

// Invented scenario: hop height (mm) against spring preload (mm) and payload (g); heavy payloads make the robot fall.
const factors: Factor[] = [
  { name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' },
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
];
const height = (preload: number, payload: number) => 20 + 6 * preload - 1.5 * (preload - 4) ** 2 + 8 * payload;

function grid(k: number) {
  const rows: { preload: number; payload: number; height?: number; failed?: boolean }[] = [];
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) {
    const preload = 1 + (4 * i) / (k - 1);
    const payload = (2 * j) / (k - 1);
    // Falls whenever payload exceeds 1.3 g.
    rows.push(payload > 1.3 ? { preload, payload, failed: true } : { preload, payload, height: height(preload, payload) });
  }
  return rows;
}

describe('feasibility model from failed trials (GP classification, Laplace approximation)', () => {
  const data = grid(5);
  const coded = data.map((r) => Float64Array.from(codePoint(factors, { preload: r.preload, payload: r.payload })));
  const model = fitFeasibility(coded, data.map((r) => r.failed === true), [false, false])!;

  it('is absent when nothing failed', () => {
    expect(fitFeasibility(coded, data.map(() => false), [false, false])).toBeNull();
  });

  it('separates the failure region from the safe one', () => {
    expect(model.failures).toBe(10);
    expect(feasibilityProbability(model, codePoint(factors, { preload: 3, payload: 2 }))).toBeLessThan(0.3);
    expect(feasibilityProbability(model, codePoint(factors, { preload: 3, payload: 0.5 }))).toBeGreaterThan(0.8);
    // Probability falls monotonically across the boundary (between 1 g and 1.5 g) along the middle preload.
    let previous = 1;
    for (let payload = 0.6; payload <= 1.61; payload += 0.1) {
      const p = feasibilityProbability(model, codePoint(factors, { preload: 3, payload }));
      expect(p).toBeLessThanOrEqual(previous + 1e-9);
      previous = p;
    }
  });

  it('keeps every suggestion above the stated threshold although the optimum lies in the failure region', () => {
    const result = suggestTrials({ factors, data, response: 'height', goal: 'maximize', count: 4, feasibilityThreshold: 0.8, seed: 2 });
    expect(result.suggestions).toHaveLength(4);
    for (const s of result.suggestions) {
      expect(s.feasibility).toBeGreaterThanOrEqual(0.8);
      expect(s.reason).toMatch(/without failure/);
      expect(Number(s.values.payload)).toBeLessThan(1.6);
    }
  });
});

describe('other strategies', () => {
  const data = grid(4).filter((r) => !r.failed);
  const base: SuggestionRequest = { factors, data, response: 'height', goal: 'maximize', count: 3, seed: 5 };

  it('confirm: replicates at the predicted best', () => {
    const r = suggestTrials({ ...base, strategy: 'confirm' });
    expect(r.suggestions).toHaveLength(3);
    expect(new Set(r.suggestions.map((s) => JSON.stringify(s.values))).size).toBe(1);
    const s = r.suggestions[0]!;
    expect(s.acquisition).toBe(s.mean);
    // The best of the observed settings is preload 5 mm, payload 1.33 g (the highest payload kept).
    expect(Number(s.values.preload)).toBeGreaterThan(4);
    expect(s.reason).toMatch(/Confirmation 1 of 3/);
  });

  it('explore: spreads the batch into the least-known part of the space', () => {
    // Data only in the low-preload half: exploration goes to the other half.
    const half = grid(5).filter((r) => !r.failed && r.preload <= 3);
    const r = suggestTrials({ ...base, data: half, strategy: 'explore', count: 3 });
    expect(r.suggestions).toHaveLength(3);
    for (const s of r.suggestions) {
      expect(Number(s.values.preload)).toBeGreaterThan(3);
      expect(s.acquisition).toBeGreaterThan(0);
      expect(s.reason).toMatch(/^Explores/);
    }
    expect(r.suggestions[0]!.acquisition).toBeGreaterThanOrEqual(r.suggestions[2]!.acquisition);
  });

  it('refine: D-optimal augmentation for the quadratic model by the design engine', () => {
    const r = suggestTrials({ ...base, strategy: 'refine', count: 2 });
    expect(r.suggestions).toHaveLength(2);
    expect(r.suggestions[0]!.reason).toMatch(/quadratic model \(D-optimal, optimal augmentation\)/);
    expect(r.suggestions[0]!.acquisition).toBeGreaterThan(0);
  });

  it('refine: keeps to settings above the feasibility threshold when trials have failed', () => {
    const r = suggestTrials({ ...base, data: grid(5), strategy: 'refine', count: 3, feasibilityThreshold: 0.8 });
    expect(r.suggestions).toHaveLength(3);
    for (const s of r.suggestions) expect(s.feasibility).toBeGreaterThanOrEqual(0.8);
  });

  it('refineDesignCandidates: each pick multiplies |FᵀF| by 1 + its prediction variance (matrix determinant lemma)', () => {
    const one: Factor[] = [{ name: 'x', kind: 'continuous', low: -1, high: 1 }];
    const observed = [-1, -0.5, 0, 0.2].map((v) => Float64Array.of(v));
    const candidates = Array.from({ length: 21 }, (_, i) => Float64Array.of(-1 + i / 10));
    const picks = refineDesignCandidates(one, observed, candidates, 2);
    expect(picks[0]!.coded[0]).toBe(1);
    const model = compileModel(one, standardTerms(one, 'quadratic'));
    const info = (pts: Float64Array[]) => {
      const f = new Matrix(pts.map((p) => Array.from(model.row(p))));
      return determinant(f.transpose().mmul(f));
    };
    const before = info(observed);
    const after = info([...observed, picks[0]!.coded]);
    expect(after / before).toBeCloseTo(1 + picks[0]!.predictionVariance, 4);
  });
});

describe('swap-aware batches', () => {
  // Surface is hard to change; glass gives much higher hops; the rig currently has turf on it.
  const swapFactors: Factor[] = [
    { name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' },
    { name: 'surface', kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true },
  ];
  const rng = seededRandom(8);
  const data: { preload: number; surface: string; height: number }[] = [];
  for (const surface of ['glass', 'turf']) {
    for (let i = 0; i < 6; i++) {
      const preload = 1 + 4 * rng.next();
      data.push({ preload, surface, height: 30 - (preload - 3.5) ** 2 + (surface === 'glass' ? 5 : 0) + 0.2 * (rng.next() - 0.5) });
    }
  }
  const base: SuggestionRequest = { factors: swapFactors, data, response: 'height', goal: 'maximize', count: 4, seed: 3 };

  it('keeps the current level when the change costs more than it gains', () => {
    // Turf explored only at low preload, so turf trials still promise improvement.
    const turfOpen = [
      ...data.filter((r) => r.surface === 'glass').map((r) => ({ ...r, height: r.height - 5 })),
      ...[1, 1.5, 2, 2.5].map((preload) => ({ preload, surface: 'turf', height: 30.5 - (preload - 3.5) ** 2 })),
    ];
    const r = suggestTrials({ ...base, data: turfOpen, swapCost: { surface: 600 } });
    expect(r.suggestions.every((s) => s.values.surface === 'turf')).toBe(true);
    expect(r.suggestions[0]!.reason).toMatch(/Keeps surface turf/);
  });

  it('changes level when it pays, and groups the batch by level', () => {
    const r = suggestTrials({ ...base, swapCost: { surface: 1 } });
    const surfaces = r.suggestions.map((s) => s.values.surface);
    expect(surfaces).toContain('glass');
    // Grouped: once the batch leaves turf it never comes back.
    const firstGlass = surfaces.indexOf('glass');
    expect(surfaces.slice(firstGlass).every((v) => v === 'glass')).toBe(true);
    expect(r.suggestions.find((s) => s.values.surface === 'glass')!.reason).toMatch(/worth its minutes/);
  });

  it('names an unknown factor in swapCost', () => {
    expect(() => suggestTrials({ ...base, swapCost: { colour: 5 } })).toThrow(/unknown factor "colour"/);
  });
});

describe('replicate or explore', () => {
  it('suggests a replicate, and says so, when every setting has been run and noise dominates', () => {
    const levels: Factor[] = [{ name: 'gain', kind: 'discrete', values: [10, 20, 30, 40, 50] }];
    const rng = seededRandom(12);
    const data = [10, 20, 30, 40, 50].flatMap((gain) =>
      [0, 1].map(() => ({ gain, speed: 1 + 0.002 * gain + 0.4 * (rng.next() - 0.5) })),
    );
    const r = suggestTrials({ factors: levels, data, response: 'speed', goal: 'maximize', count: 1, seed: 1 });
    expect(r.suggestions[0]!.reason).toMatch(/^Replicate of trial \d+/);
  });
});

describe('surrogate slices for plotting', () => {
  const data = grid(4).filter((r) => !r.failed);
  const model = fitSurrogate({ factors, data, response: 'height', goal: 'maximize', count: 1 });

  it('one factor: mean and sd along it, agreeing with predict', () => {
    const slice = surrogateSlice(model, 'preload', { payload: 1 }, 11);
    expect(slice.points).toHaveLength(11);
    expect(slice.points[0]!.value).toBe(1);
    expect(slice.points[10]!.value).toBe(5);
    const p = predict(model, codePoint(factors, { preload: 1, payload: 1 }));
    expect(slice.points[0]!.mean).toBeCloseTo(p.mean, 12);
    expect(slice.points[0]!.sd).toBeCloseTo(p.sd, 12);
  });

  it('two factors: an n × n grid', () => {
    const g = surrogateGrid(model, 'preload', 'payload', {}, 5);
    expect(g.mean).toHaveLength(5);
    expect(g.mean[0]).toHaveLength(5);
    expect(g.sd[4]![4]).toBeGreaterThanOrEqual(0);
    expect(() => surrogateGrid(model, 'preload', 'preload')).toThrow(/two different/);
  });
});

describe('several responses through desirability (Derringer & Suich 1980)', () => {
  it('models the overall desirability and heads where both responses are satisfied', () => {
    // Invented: hop height (maximise, 20..40 mm) and landing tilt (minimise, 2..10 degrees) against preload.
    const one: Factor[] = [{ name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' }];
    const data = [1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5].map((preload) => ({ preload, height: 15 + 6 * preload, tilt: 1 + 2 * Math.max(0, preload - 3) ** 2 }));
    const r = suggestTrials({
      factors: one, data, response: 'overall', goal: 'minimize', count: 1, seed: 2,
      responses: [
        { name: 'height', goal: 'maximize', lower: 20, upper: 40 },
        { name: 'tilt', goal: 'minimize', lower: 2, upper: 10 },
      ],
    });
    expect(r.model.desirabilityOf).toEqual(['height', 'tilt']);
    const p = Number(r.suggestions[0]!.values.preload);
    // Overall desirability peaks between 3 and 4 mm (height still rising, tilt not yet large).
    expect(p).toBeGreaterThan(2.8);
    expect(p).toBeLessThan(4.2);
    expect(r.suggestions[0]!.mean).toBeGreaterThan(0.4);
  });

  it('names a response missing from a trial', () => {
    const one: Factor[] = [{ name: 'preload', kind: 'continuous', low: 1, high: 5 }];
    expect(() => suggestTrials({
      factors: one, data: [{ preload: 1, height: 20 }, { preload: 2, height: 25, tilt: 3 }], response: 'overall', goal: 'maximize', count: 1,
      responses: [{ name: 'height', goal: 'maximize', lower: 20, upper: 40 }, { name: 'tilt', goal: 'minimize', lower: 2, upper: 10 }],
    })).toThrow(/trial 1 has no numeric tilt/);
  });
});

describe('leave-one-out summary', () => {
  it('reports per-trial residuals, their RMS and the share within two sd', () => {
    const data = grid(4).filter((r) => !r.failed);
    const r = suggestTrials({ factors, data, response: 'height', goal: 'maximize', count: 1, seed: 1 });
    const loo = r.model.leaveOneOut;
    expect(loo.residuals).toHaveLength(data.length);
    expect(loo.residuals[0]!.trial).toBe(1);
    expect(loo.rmse).toBeCloseTo(Math.sqrt(loo.residuals.reduce((s, x) => s + x.residual ** 2, 0) / data.length), 12);
    expect(loo.withinTwoSd).toBeGreaterThan(0.7);
  });
});
