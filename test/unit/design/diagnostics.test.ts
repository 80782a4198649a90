import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { fTestPower, generateDesign, noncentralFCdf } from '@/domain/design';

const cont = (name: string): Factor => ({ name, kind: 'continuous', low: -1, high: 1 });

describe('non-central F distribution and power', () => {
  // Values computed with scipy.stats.ncf (an independent implementation), not a published table.
  const cases: [number, number, number, number, number][] = [
    [2.5, 1, 10, 4.0, 0.33195888734979795],
    [3.1, 3, 12, 7.5, 0.46005598117095414],
    [1.0, 2, 5, 0.5, 0.49644226702605154],
    [4.2, 1, 20, 16.0, 0.030122630699608396],
    [2.0, 4, 30, 30.0, 0.002229058393938913],
  ];
  for (const [f, d1, d2, lambda, expected] of cases) {
    it(`P(F'(${d1}, ${d2}, ${lambda}) ≤ ${f}) = ${expected.toPrecision(6)}`, () => {
      expect(noncentralFCdf(f, d1, d2, lambda)).toBeCloseTo(expected, 9);
    });
  }

  it('gives the power of the level-α test (scipy.stats.ncf values)', () => {
    expect(fTestPower(1, 10, 4.0, 0.05)).toBeCloseTo(0.43962730112487003, 7);
    expect(fTestPower(3, 12, 7.5, 0.05)).toBeCloseTo(0.47613847812658816, 7);
    expect(fTestPower(1, 20, 16.0, 0.01)).toBeCloseTo(0.8612727471306358, 7);
    expect(fTestPower(1, 10, 0, 0.05)).toBeCloseTo(0.05, 9);
  });
});

describe('diagnostics of an orthogonal two-level design', () => {
  const d = generateDesign({ factors: [cont('a'), cont('b'), cont('c')], method: 'full-factorial', model: 'main-effects', seed: 1, power: { effectSize: 2, sigma: 1 } });

  it('has every efficiency 1, VIF 1 and zero correlations', () => {
    const g = d.diagnostics;
    expect(g.dEfficiency).toBeCloseTo(1, 12);
    expect(g.aEfficiency).toBeCloseTo(1, 12);
    expect(g.iEfficiency).toBeCloseTo(1, 12);
    // SPV = 1 + a² + b² + c², largest (= p = 4) at the corners.
    expect(g.gEfficiency).toBeCloseTo(1, 12);
    expect(g.maxVif).toBeCloseTo(1, 12);
    expect(g.correlation.labels).toEqual(['a', 'b', 'c']);
    for (const row of g.correlation.values) for (const v of row) expect(Math.abs(v) < 1e-12 || Math.abs(v - 1) < 1e-12).toBe(true);
    // Average SPV over the cube: 1 + 3 × E[x²] = 2.
    expect(g.averagePredictionVariance).toBeCloseTo(2, 12);
  });

  it('gives each term the power of a 1-df F test with λ = n β²/σ² (scipy.stats.ncf value)', () => {
    // β = effect / 2 = 1σ, (X'X)^-1 = I/8, so λ = 8; error df = 8 − 4 = 4.
    const power = d.diagnostics.power!;
    expect(power.map((t) => t.term)).toEqual(['a', 'b', 'c']);
    for (const t of power) {
      expect(t.noncentrality).toBeCloseTo(8, 12);
      expect(t.denominatorDf).toBe(4);
      expect(t.power).toBeCloseTo(0.5716094577007154, 7);
    }
  });

  it('draws a non-decreasing fraction-of-design-space curve between the centre (1) and the corners (4)', () => {
    const { fraction, scaledPredictionVariance: spv } = d.diagnostics.fractionOfDesignSpace;
    expect(fraction).toHaveLength(21);
    for (let i = 1; i < spv.length; i++) expect(spv[i]!).toBeGreaterThanOrEqual(spv[i - 1]!);
    expect(spv[0]!).toBeGreaterThanOrEqual(1);
    expect(spv[0]!).toBeLessThan(1.2);
    expect(spv[20]!).toBeLessThanOrEqual(4);
    expect(spv[20]!).toBeGreaterThan(3.7);
    // Median of 1 + a² + b² + c² with uniform a, b, c: close to 2.
    expect(Math.abs(spv[10]! - 2)).toBeLessThan(0.15);
  });

  it('shows the loss of a constrained design: correlated columns, VIF above 1', () => {
    const c = generateDesign({
      factors: [cont('a'), cont('b')],
      method: 'optimal',
      model: 'interactions',
      runs: 8,
      seed: 3,
      constraints: [{ terms: { a: 1, b: 1 }, max: 0.5 }],
    });
    expect(c.diagnostics.maxVif).toBeGreaterThan(1);
    for (const r of c.runs) expect((r.values.a as number) + (r.values.b as number)).toBeLessThanOrEqual(0.5 + 1e-9);
    expect(c.diagnostics.gEfficiency).toBeGreaterThan(0);
    expect(c.diagnostics.gEfficiency).toBeLessThanOrEqual(1 + 1e-9);
  });
});
