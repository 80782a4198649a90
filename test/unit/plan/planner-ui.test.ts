import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sortedBy } from '@/components/MovePanel';
import { candidateBody } from '@/components/PlannerPanel';
import { heatShade, linePath, linearScale, ticks } from '@/components/plan-charts';

describe('planner form to design request', () => {
  it('sends only the fields filled in, as numbers', () => {
    expect(candidateBody({ method: 'optimal', model: 'interactions', runs: '24', centerPoints: '', wholePlots: '6', criterion: 'I', seed: '3' })).toEqual({
      method: 'optimal',
      model: 'interactions',
      runs: 24,
      wholePlots: 6,
      criterion: 'I',
      seed: 3,
    });
    expect(candidateBody({ method: 'full-factorial', model: '', runs: ' ', centerPoints: '', wholePlots: '', criterion: '', seed: '' })).toEqual({ method: 'full-factorial' });
  });
  it('sends blocks, and random block effects only for an optimal design with blocks', () => {
    const base = { model: '', runs: '', centerPoints: '', wholePlots: '', criterion: '', seed: '' };
    expect(candidateBody({ ...base, method: 'full-factorial', blocks: '4', blockEffects: 'random' })).toEqual({ method: 'full-factorial', blocks: 4 });
    expect(candidateBody({ ...base, method: 'optimal', blocks: '3', blockEffects: 'random' })).toEqual({ method: 'optimal', blocks: 3, blockEffects: 'random' });
    expect(candidateBody({ ...base, method: 'optimal', blocks: '', blockEffects: 'random' })).toEqual({ method: 'optimal' });
  });
  it('sends block generators for a blocked two-level candidate only', () => {
    const base = { model: '', runs: '', centerPoints: '', wholePlots: '', criterion: '', seed: '' };
    expect(candidateBody({ ...base, method: 'full-factorial', blocks: '4', blockGenerators: 'ABC, CDE' })).toEqual({ method: 'full-factorial', blocks: 4, blockGenerators: ['ABC', 'CDE'] });
    expect(candidateBody({ ...base, method: 'fractional-factorial', blocks: '', blockGenerators: 'ABD' })).toEqual({ method: 'fractional-factorial', blockGenerators: ['ABD'] });
    expect(candidateBody({ ...base, method: 'optimal', blocks: '4', blockGenerators: 'ABC' })).toEqual({ method: 'optimal', blocks: 4 });
    expect(candidateBody({ ...base, method: 'full-factorial', blocks: '2', blockGenerators: ' , ' })).toEqual({ method: 'full-factorial', blocks: 2 });
  });
});

describe('sorting runs inside a whole plot (what the move check must refuse)', () => {
  const runs = [
    { id: '7', values: { payload: 1.8, gain: 'b' } },
    { id: '3', values: { payload: 0, gain: 'a' } },
    { id: '9', values: { payload: 1.8, gain: 'a' } },
  ];
  it('sorts numerically or by text, ties keeping the design order', () => {
    expect(sortedBy(runs, 'payload')).toEqual(['3', '7', '9']);
    expect(sortedBy(runs, 'gain')).toEqual(['3', '9', '7']);
  });
  it('is a permutation of the plot and sorted by the factor (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 5 }), { minLength: 1, maxLength: 12 }), (xs) => {
        const plot = xs.map((x, i) => ({ id: String(i), values: { f: x } }));
        const ids = sortedBy(plot, 'f');
        expect([...ids].sort()).toEqual(plot.map((r) => r.id).sort());
        const vals = ids.map((id) => plot[Number(id)]!.values.f);
        for (let i = 1; i < vals.length; i++) expect(vals[i]!).toBeGreaterThanOrEqual(vals[i - 1]!);
      }),
      { seed: 42, numRuns: 100 },
    );
  });
});

describe('chart geometry', () => {
  it('shades |r| from white to dark, clipped', () => {
    expect(heatShade(0)).toBe('rgb(255, 255, 255)');
    expect(heatShade(-1)).toBe('rgb(23, 80, 68)');
    expect(heatShade(3)).toBe(heatShade(1));
  });
  it('maps linearly, draws a path, spaces ticks evenly', () => {
    const x = linearScale(0, 1, 40, 240);
    expect(x(0.5)).toBe(140);
    expect(linearScale(2, 2, 0, 10)(5)).toBe(5);
    expect(linePath([0, 1], [0, 2], x, linearScale(0, 2, 100, 0))).toBe('M40.0 100.0 L240.0 0.0');
    expect(ticks(0, 2, 4)).toEqual([0, 0.5, 1, 1.5, 2]);
  });
});
