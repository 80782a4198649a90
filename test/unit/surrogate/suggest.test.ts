import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { suggestTrials, type SuggestionRequest } from '@/domain/surrogate';
import { isFeasible, type Factor } from '@/domain/factors';
import { seededRandom } from '@/domain/random';
import { DomainError } from '@/domain/errors';

// Invented scenario: hop height (mm) of a small hopping robot against payload, controller gain and surface.
const factors: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'discrete', values: [10, 20, 30] },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'glass', 'sand'], hardToChange: true },
];
const surfaceEffect: Record<string, number> = { turf: 0, glass: 8, sand: -6 };

function hopHeight(payload: number, gain: number, surface: string, noise: number): number {
  return 60 - 12 * (payload - 0.7) ** 2 + 0.4 * gain - 0.008 * gain * gain + surfaceEffect[surface]! + noise;
}

function campaign(n: number, seed: number) {
  const rng = seededRandom(seed);
  return Array.from({ length: n }, (_, i) => {
    const payload = 2 * rng.next();
    const gain = [10, 20, 30][i % 3]!;
    const surface = ['turf', 'glass', 'sand'][Math.floor(i / 3) % 3]!;
    return { payload, gain, surface, height: hopHeight(payload, gain, surface, 0.5 * (rng.next() - 0.5)) };
  });
}

const base: SuggestionRequest = { factors, data: campaign(18, 1), response: 'height', goal: 'maximize', count: 4, seed: 11 };

describe('suggestTrials, strategy "improve"', () => {
  it('returns a full batch of distinct, allowed trials with mean, sd, acquisition and a reason', () => {
    const result = suggestTrials(base);
    expect(result.suggestions).toHaveLength(4);
    const keys = new Set<string>();
    for (const s of result.suggestions) {
      expect(Number(s.values.payload)).toBeGreaterThanOrEqual(0);
      expect(Number(s.values.payload)).toBeLessThanOrEqual(2);
      expect([10, 20, 30]).toContain(s.values.gain);
      expect(['turf', 'glass', 'sand']).toContain(s.values.surface);
      expect(Number.isFinite(s.mean)).toBe(true);
      expect(s.sd).toBeGreaterThanOrEqual(0);
      expect(s.acquisition).toBeGreaterThanOrEqual(0);
      expect(s.reason.length).toBeGreaterThan(10);
      expect(s.reason).not.toMatch(/\n/);
      keys.add(JSON.stringify(s.values));
    }
    expect(keys.size).toBe(4);
    expect(Object.keys(result.model.lengthScales)).toEqual(['payload', 'gain', 'surface']);
    expect(result.model.kernel).toBe('matern52');
    expect(result.model.noiseVariance).toBeGreaterThan(0);
    expect(result.model.observations).toBe(18);
  });

  it('heads for the best region: glass, payload near 0.7 g, gain near 25', () => {
    const first = suggestTrials({ ...base, data: campaign(27, 2), count: 1 }).suggestions[0]!;
    expect(first.values.surface).toBe('glass');
    expect(Math.abs(Number(first.values.payload) - 0.7)).toBeLessThan(0.35);
    expect([20, 30]).toContain(first.values.gain);
  });

  it('minimises when asked (1-D bowl with its minimum at 0.3)', () => {
    const x = [-1, -0.7, -0.4, -0.1, 0.2, 0.5, 0.8, 1];
    const data = x.map((v) => ({ x: v, y: (v - 0.3) ** 2 }));
    const one: Factor[] = [{ name: 'x', kind: 'continuous', low: -1, high: 1 }];
    const s = suggestTrials({ factors: one, data, response: 'y', goal: 'minimize', count: 1, seed: 1 }).suggestions[0]!;
    expect(Math.abs(Number(s.values.x) - 0.3)).toBeLessThan(0.1);
    const up = suggestTrials({ factors: one, data: data.map((r) => ({ ...r, y: -r.y })), response: 'y', goal: 'maximize', count: 1, seed: 1 }).suggestions[0]!;
    expect(Number(up.values.x)).toBeCloseTo(Number(s.values.x), 6);
  });

  it('is reproducible: the same seed gives the same answer', () => {
    expect(JSON.stringify(suggestTrials(base))).toBe(JSON.stringify(suggestTrials(base)));
  });

  it('leaves failed trials out of the surrogate', () => {
    const data = [...campaign(12, 3), { payload: 1.9, gain: 30, surface: 'sand', failed: true }];
    expect(suggestTrials({ ...base, data, count: 1 }).model.observations).toBe(12);
  });

  it('always honours linear constraints (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1.2, max: 4, noNaN: true }), fc.integer({ min: 1, max: 1000 }), (limit, seed) => {
        // payload + gain / 10 ≤ limit: heavy payloads only with low gain.
        const constraints = [{ terms: { payload: 1, gain: 0.1 }, max: limit }];
        const data = campaign(12, seed).filter((r) => r.payload + r.gain / 10 <= limit + 1);
        if (data.length < 3) return;
        const result = suggestTrials({ ...base, data, constraints, count: 2, seed });
        for (const s of result.suggestions) expect(isFeasible({ factors, constraints }, s.values)).toBe(true);
      }),
      { numRuns: 6, seed: 42 },
    );
  });

  it('names the field at fault', () => {
    const fieldOf = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(DomainError);
        return (e as DomainError).field;
      }
      return 'no error';
    };
    expect(fieldOf(() => suggestTrials({ ...base, count: 0 }))).toBe('count');
    const missing = campaign(5, 1).map((r, i) => (i === 2 ? { ...r, height: undefined } : r));
    expect(fieldOf(() => suggestTrials({ ...base, data: missing }))).toBe('data[2].height');
    const badLevel = campaign(5, 1).map((r, i) => (i === 1 ? { ...r, surface: 'ice' } : r));
    expect(fieldOf(() => suggestTrials({ ...base, data: badLevel }))).toBe('data[1].surface');
    expect(fieldOf(() => suggestTrials({ ...base, data: campaign(1, 1) }))).toBe('data');
    expect(() => suggestTrials({ ...base, constraints: [{ terms: { payload: 1 }, min: 5 }] })).toThrow(/no point of the factor space/);
  });
});

describe('small and degenerate campaigns', () => {
  const surfaceOnly: Factor[] = [{ name: 'surface', kind: 'categorical', levels: ['turf', 'glass'] }];
  it('a space with fewer settings than the batch: every strategy answers without error, new trials distinct', () => {
    const data = [{ surface: 'turf', y: 1 }, { surface: 'glass', y: 2 }, { surface: 'turf', y: 1.2 }];
    for (const strategy of ['improve', 'explore', 'refine', 'confirm'] as const) {
      const r = suggestTrials({ factors: surfaceOnly, data, response: 'y', goal: 'maximize', count: 4, strategy });
      expect(r.suggestions.length).toBeGreaterThan(0);
      expect(r.suggestions.length).toBeLessThanOrEqual(4);
    }
  });

  it('a constant response and replicated settings with different responses still fit', () => {
    expect(suggestTrials({ factors: surfaceOnly, data: [{ surface: 'turf', y: 1 }, { surface: 'glass', y: 1 }], response: 'y', goal: 'maximize', count: 1 }).suggestions).toHaveLength(1);
    const one: Factor[] = [{ name: 'x', kind: 'continuous', low: 0, high: 1 }];
    const r = suggestTrials({ factors: one, data: [{ x: 0.5, y: 1 }, { x: 0.5, y: 3 }, { x: 0.5, y: 2 }], response: 'y', goal: 'minimize', count: 2 });
    expect(r.suggestions).toHaveLength(2);
    expect(r.model.noiseVariance).toBeGreaterThan(0.1);
  });
});
