/**
 * Split-plot REML with Kenward–Roger degrees of freedom against outside values: an invented split plot
 * (8 surface beds as whole plots, 4 runs each) fitted by statsmodels MixedLM (REML) and by the classical
 * split-plot ANOVA, which Kenward–Roger reproduces exactly for balanced data (Kenward & Roger 1997).
 * Fixture and how it was made: test/fixtures/split-plot-reml/SOURCE.md.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze, splitPlotAnalysis } from '@/domain/analysis';

const dir = new URL('../../fixtures/split-plot-reml/', import.meta.url);
const lines = readFileSync(new URL('data.csv', dir), 'utf8').trim().split(/\r?\n/);
const header = lines[0]!.split(',');
const data = lines.slice(1).map((l) => {
  const cells = l.split(',');
  const row: Record<string, number | string> = {};
  header.forEach((h, j) => (row[h] = h === 'bed' ? cells[j]! : Number(cells[j])));
  return row;
});
const expected = JSON.parse(readFileSync(new URL('expected.json', dir), 'utf8'));
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('split-plot REML and Kenward–Roger (statsmodels MixedLM; classical split-plot ANOVA)', () => {
  const request = { data, response: 'efficiency', terms: expected.terms as string[], wholePlot: 'bed' };
  const sp = splitPlotAnalysis(request);
  const closed = expected.balanced.closedForm;
  const sm = expected.balanced.statsmodels;

  it('estimates the variance components as statsmodels REML and the closed form do (≥ 10 digits)', () => {
    expect(rel(sp.wholePlotVariance, closed.wholePlotVariance)).toBeLessThan(1e-10);
    expect(rel(sp.residualVariance, closed.residualVariance)).toBeLessThan(1e-10);
    expect(rel(sp.wholePlotVariance, sm.wholePlotVariance)).toBeLessThan(1e-10);
    expect(rel(sp.residualVariance, sm.residualVariance)).toBeLessThan(1e-10);
  });

  it('gives the fixed effects and their standard errors (≥ 10 digits)', () => {
    expect(sp.coefficients.map((c) => c.term)).toEqual(expected.coefficientOrder);
    sp.coefficients.forEach((c, j) => {
      expect(rel(c.estimate, closed.estimates[j])).toBeLessThan(1e-12);
      expect(rel(c.estimate, sm.estimates[j])).toBeLessThan(1e-10);
      expect(rel(c.stdError!, closed.stdErrors[j])).toBeLessThan(1e-10);
      expect(rel(c.stdError!, sm.stdErrors[j])).toBeLessThan(1e-9);
    });
  });

  it('tests whole-plot terms on 5 df and subplot terms on 20 df, with the classical F and p', () => {
    expect(sp.wholePlotErrorDf).toBe(closed.wholePlotErrorDf);
    expect(sp.subplotErrorDf).toBe(closed.subplotErrorDf);
    for (const t of sp.tests) {
      const ref = closed.anova[t.source];
      expect(t.stratum).toBe(ref.denominatorDf === 5 ? 'whole plot' : 'subplot');
      expect(Math.abs(t.denominatorDf - ref.denominatorDf)).toBeLessThan(1e-8);
      expect(rel(t.f, ref.f)).toBeLessThan(1e-9);
      expect(rel(t.p, ref.p)).toBeLessThan(1e-7);
    }
    // The coefficient t tests carry the same df.
    expect(sp.coefficients.find((c) => c.term === 'surface')!.df).toBeCloseTo(5, 8);
    expect(sp.coefficients.find((c) => c.term === 'payload')!.df).toBeCloseTo(20, 8);
  });

  it('matches statsmodels REML on unbalanced data (two runs left out)', () => {
    const drop = new Set<number>(expected.unbalanced.droppedRows);
    const un = splitPlotAnalysis({ ...request, data: data.filter((_, i) => !drop.has(i)) });
    const ref = expected.unbalanced.statsmodels;
    // statsmodels' optimiser stops at about 1e-7 relative on these data.
    expect(rel(un.wholePlotVariance, ref.wholePlotVariance)).toBeLessThan(1e-6);
    expect(rel(un.residualVariance, ref.residualVariance)).toBeLessThan(1e-6);
    un.coefficients.forEach((c, j) => expect(rel(c.estimate, ref.estimates[j])).toBeLessThan(1e-7));
    // Kenward–Roger df lie between... the strata: near 5 for whole-plot terms, near 18 for subplot terms.
    for (const t of un.tests) {
      if (t.stratum === 'whole plot') expect(t.denominatorDf).toBeGreaterThan(4);
      else expect(t.denominatorDf).toBeGreaterThan(15);
    }
  });

  it('answers through analyze() with the contract fields, variance components and denominator df', () => {
    const r = analyze(request);
    expect(r.varianceComponents!.wholePlot).toBeCloseTo(closed.wholePlotVariance, 12);
    expect(r.splitPlot!.wholePlots).toBe(8);
    expect(r.splitPlot!.wholePlotErrorDf).toBe(5);
    expect(r.anova.find((a) => a.source === 'surface')!.denominatorDf).toBeCloseTo(5, 8);
    expect(r.anova.find((a) => a.source === 'payload*gain')!.denominatorDf).toBeCloseTo(20, 8);
    expect(r.residualStdError).toBeCloseTo(Math.sqrt(closed.residualVariance), 12);
    expect(r.residuals).toHaveLength(32);
    expect(r.rSquared).toBeGreaterThan(0.5);
    expect(r.rSquared).toBeLessThan(1);
  });
});
