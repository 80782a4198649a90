import { describe, expect, it } from 'vitest';
import { analyze, splitPlotAnalysis } from '@/domain/analysis';

// Invented balanced split plot: surface bed set-up A (whole-plot factor, 4 beds per level) and
// gain B at three levels within every bed. Noise from fixed formulas for determinism.
const wpEffect = [0.9, -1.2, 0.4, -0.3, 1.1, -0.8, 0.2, -0.5];
const data = Array.from({ length: 24 }, (_, i) => {
  const wp = Math.floor(i / 3);
  const A = wp < 4 ? -1 : 1;
  const B = (i % 3) - 1;
  const e = 0.4 * Math.sin(12.9898 * (i + 1));
  return { bed: `bed${wp + 1}`, A, B, y: 10 + 2 * A + 1.5 * B + 0.5 * A * B + wpEffect[wp]! + e };
});

describe('split-plot REML with Kenward–Roger degrees of freedom (Kenward & Roger 1997)', () => {
  const sp = splitPlotAnalysis({ data, response: 'y', terms: ['A', 'B', 'A*B'], wholePlot: 'bed' });

  it('tests the whole-plot factor on whole-plot error and subplot terms on subplot error (balanced case: classical F and df)', () => {
    // Classical split-plot ANOVA: A against beds within A (8 − 2 = 6 df), B and A*B against the
    // subplot residual (24 − 8 − 2 = 14 df). KR reproduces these exactly in balanced designs.
    const means = Array.from({ length: 8 }, (_, w) => {
      const rows = data.filter((d) => d.bed === `bed${w + 1}`);
      return { A: rows[0]!.A, y: rows.reduce((s, d) => s + d.y, 0) / rows.length };
    });
    const wholePlotAnova = analyze({ data: means, response: 'y', terms: ['A'] });
    const subplotAnova = analyze({ data, response: 'y', terms: ['bed', 'B', 'A*B'] });
    const tA = sp.tests.find((t) => t.source === 'A')!;
    const tB = sp.tests.find((t) => t.source === 'B')!;
    const tAB = sp.tests.find((t) => t.source === 'A*B')!;
    expect(tA.denominatorDf).toBeCloseTo(6, 6);
    expect(tB.denominatorDf).toBeCloseTo(14, 6);
    expect(tAB.denominatorDf).toBeCloseTo(14, 6);
    // F agrees to the precision of the REML optimum (score equation solved to rounding).
    const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
    expect(rel(tA.f, wholePlotAnova.anova.find((r) => r.source === 'A')!.f!)).toBeLessThan(1e-9);
    expect(rel(tB.f, subplotAnova.anova.find((r) => r.source === 'B')!.f!)).toBeLessThan(1e-9);
    expect(rel(tAB.f, subplotAnova.anova.find((r) => r.source === 'A*B')!.f!)).toBeLessThan(1e-9);
  });

  it('estimates the variance components by REML (balanced: from the two mean squares)', () => {
    const subplotAnova = analyze({ data, response: 'y', terms: ['bed', 'B', 'A*B'] });
    const msE = subplotAnova.residualStdError! ** 2;
    expect(sp.residualVariance).toBeCloseTo(msE, 6);
    const means = Array.from({ length: 8 }, (_, w) => {
      const rows = data.filter((d) => d.bed === `bed${w + 1}`);
      return { A: rows[0]!.A, y: rows.reduce((s, d) => s + d.y, 0) / rows.length };
    });
    const msWp = 3 * analyze({ data: means, response: 'y', terms: ['A'] }).residualStdError! ** 2;
    expect(sp.wholePlotVariance).toBeCloseTo((msWp - msE) / 3, 6);
    expect(sp.wholePlots).toBe(8);
    // Coefficients equal OLS in a balanced design; the whole-plot factor's error is larger.
    const ols = analyze({ data, response: 'y', terms: ['A', 'B', 'A*B'] });
    sp.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(ols.coefficients[j]!.estimate, 9));
    const seA = sp.coefficients.find((c) => c.term === 'A')!.stdError!;
    const seB = sp.coefficients.find((c) => c.term === 'B')!.stdError!;
    expect(seA).toBeGreaterThan(seB);
  });

  it('needs a whole-plot column', () => {
    expect(() => splitPlotAnalysis({ data: data.map(({ bed: _bed, ...rest }) => rest), response: 'y', terms: ['A'], wholePlot: 'bed' })).toThrow(/whole plot/);
  });

  it('gives finite Kenward–Roger df between the whole-plot and subplot counts when a run is missing', () => {
    const unbalanced = splitPlotAnalysis({ data: data.slice(1), response: 'y', terms: ['A', 'B', 'A*B'], wholePlot: 'bed' });
    const tA = unbalanced.tests.find((t) => t.source === 'A')!;
    const tB = unbalanced.tests.find((t) => t.source === 'B')!;
    expect(tA.denominatorDf).toBeGreaterThan(4);
    expect(tA.denominatorDf).toBeLessThan(8);
    expect(tB.denominatorDf).toBeGreaterThan(10);
    expect(tB.denominatorDf).toBeLessThan(16);
    for (const t of unbalanced.tests) expect(t.p).toBeGreaterThanOrEqual(0);
  });

  it('gives the same tests whatever the response scale, and keeps two whole-plot df stable', () => {
    // 4 whole plots, one whole-plot factor: 4 − 2 = 2 whole-plot error df, where the general
    // Kenward–Roger scale factor is 0·∞; single-df tests use its exact form (λ = 1, m = 2/A2).
    const small = Array.from({ length: 12 }, (_, i) => ({ wp: `p${Math.floor(i / 3)}`, A: Math.floor(i / 3) % 2 ? 1 : -1, B: (i % 3) - 1, y: 1 + 0.1 * i + 0.05 * Math.sin(i * 3.1) }));
    const ref = splitPlotAnalysis({ data: small, response: 'y', terms: ['A', 'B'], wholePlot: 'wp' });
    expect(ref.tests[0]!.denominatorDf).toBeCloseTo(2, 8);
    for (const factor of [1e-300, 1e-8, 1e8, 1e300]) {
      const r = splitPlotAnalysis({ data: small.map((d) => ({ ...d, y: d.y * factor })), response: 'y', terms: ['A', 'B'], wholePlot: 'wp' });
      r.tests.forEach((t, j) => {
        expect(t.f).toBeCloseTo(ref.tests[j]!.f, 8);
        expect(t.p).toBeCloseTo(ref.tests[j]!.p, 10);
        expect(t.denominatorDf).toBeCloseTo(ref.tests[j]!.denominatorDf, 8);
      });
      r.coefficients.forEach((c, j) => expect(c.estimate / factor).toBeCloseTo(ref.coefficients[j]!.estimate, 10));
    }
  });

  it('refuses an exact fit (no error to test against), naming the response', () => {
    const exact = data.map((d) => ({ ...d, y: 3 + d.A - d.B }));
    expect(() => splitPlotAnalysis({ data: exact, response: 'y', terms: ['A', 'B'], wholePlot: 'bed' })).toThrow(expect.objectContaining({ field: 'response' }));
    const constant = data.map((d) => ({ ...d, y: 7 }));
    expect(() => splitPlotAnalysis({ data: constant, response: 'y', terms: ['A', 'B'], wholePlot: 'bed' })).toThrow(/exact fit/);
  });

  it('tests a three-level whole-plot factor (two numerator df) with the classical F on 6 df', () => {
    // 9 beds, surface at 3 levels (3 beds each), gain B at 3 levels in every bed: surface on
    // 9 − 3 = 6 whole-plot df; B and surface*B on 27 − 6 parameters − 6 = 15 subplot df.
    const shift = [0.5, -0.7, 0.2, 0.9, -0.4, -0.1, 0.3, -0.6, 0.4];
    const rows = Array.from({ length: 27 }, (_, i) => {
      const bed = Math.floor(i / 3);
      const surface = ['turf', 'glass', 'soil'][bed % 3]!;
      const B = (i % 3) - 1;
      return { bed: `b${bed}`, surface, B, y: 5 + (surface === 'glass' ? 1.2 : surface === 'soil' ? -0.4 : 0) + 0.8 * B + shift[bed]! + 0.3 * Math.sin(5.1 * i) };
    });
    const sp = splitPlotAnalysis({ data: rows, response: 'y', terms: ['surface', 'B', 'surface*B'], wholePlot: 'bed' });
    const means = Array.from({ length: 9 }, (_, w) => {
      const r = rows.filter((d) => d.bed === `b${w}`);
      return { surface: r[0]!.surface, y: r.reduce((s, d) => s + d.y, 0) / 3 };
    });
    const whole = analyze({ data: means, response: 'y', terms: ['surface'] });
    const sub = analyze({ data: rows, response: 'y', terms: ['bed', 'B', 'surface*B'] });
    const tS = sp.tests.find((t) => t.source === 'surface')!;
    expect(tS.df).toBe(2);
    expect(tS.stratum).toBe('whole plot');
    expect(tS.denominatorDf).toBeCloseTo(6, 6);
    expect(Math.abs(tS.f - whole.anova.find((r) => r.source === 'surface')!.f!) / tS.f).toBeLessThan(1e-9);
    const tSB = sp.tests.find((t) => t.source === 'surface*B')!;
    expect(tSB.df).toBe(2);
    expect(tSB.stratum).toBe('subplot');
    expect(sub.residualDf).toBe(15);
    expect(tSB.denominatorDf).toBeCloseTo(15, 6);
    expect(Math.abs(tSB.f - sub.anova.find((r) => r.source === 'surface*B')!.f!) / tSB.f).toBeLessThan(1e-9);
  });
});
