import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { suggestTrials, type SuggestionStrategy } from '@/domain/surrogate';
import { isFeasible, type Factor, type FactorSpace } from '@/domain/factors';
import { seededRandom } from '@/domain/random';

// Invented scenario: hop distance (mm) against payload, gain and surface; ice with the heaviest payloads is never run.
const factors: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'discrete', values: [10, 20, 30] },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'sand'] },
];

function campaign(seed: number) {
  const rng = seededRandom(seed);
  return Array.from({ length: 12 }, (_, i) => {
    const payload = 1.4 * rng.next();
    const gain = [10, 20, 30][i % 3]!;
    const surface = ['turf', 'ice', 'sand'][Math.floor(i / 3) % 3]!;
    return { payload, gain, surface, distance: 80 - 20 * (payload - 0.8) ** 2 + gain / 3 + (surface === 'sand' ? -10 : 0) + rng.next() };
  });
}

describe('constraints hold for every strategy (property)', () => {
  const strategies: SuggestionStrategy[] = ['improve', 'explore', 'refine', 'confirm'];
  it('linear constraints and disallowed combinations are never broken', () => {
    fc.assert(
      fc.property(fc.constantFrom(...strategies), fc.double({ min: 1.5, max: 4, noNaN: true }), fc.integer({ min: 1, max: 10000 }), (strategy, limit, seed) => {
        const space: FactorSpace = {
          factors,
          constraints: [{ terms: { payload: 1, gain: 0.05 }, max: limit }],
          disallowed: [{ levels: { surface: 'ice', gain: 30 } }],
        };
        const data = campaign(seed).filter((r) => isFeasible(space, r));
        if (data.length < 3) return;
        const result = suggestTrials({ factors, data, constraints: space.constraints, disallowed: space.disallowed, response: 'distance', goal: 'maximize', count: 3, strategy, seed });
        for (const s of result.suggestions) expect(isFeasible(space, s.values)).toBe(true);
      }),
      { numRuns: 8, seed: 7 },
    );
  });

  it('every strategy is reproducible for a given seed', () => {
    for (const strategy of strategies) {
      const request = { factors, data: campaign(3), response: 'distance', goal: 'maximize' as const, count: 2, strategy, seed: 9 };
      expect(JSON.stringify(suggestTrials(request))).toBe(JSON.stringify(suggestTrials(request)));
    }
  });
});

describe('swap-aware batches with numeric hard-to-change factors', () => {
  it('holds a costly continuous factor at its current value when trials there still promise improvement', () => {
    // The rig is set to 0.8 g, the best payload; improvement comes from gain and surface.
    const data = campaign(4).map((r, i, all) => (i === all.length - 1 ? { ...r, payload: 0.8 } : r));
    const current = 0.8;
    const r = suggestTrials({ factors, data, response: 'distance', goal: 'maximize', count: 3, seed: 2, swapCost: { payload: 100000 } });
    expect(r.suggestions).toHaveLength(3);
    for (const s of r.suggestions) expect(Number(s.values.payload)).toBeCloseTo(current, 9);
  });

  it('a costly discrete factor keeps its level or moves the whole batch together', () => {
    const data = campaign(5);
    const r = suggestTrials({ factors, data, response: 'distance', goal: 'maximize', count: 3, seed: 2, swapCost: { gain: 100000 } });
    expect(new Set(r.suggestions.map((s) => s.values.gain)).size).toBe(1);
  });
});
