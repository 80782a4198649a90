/**
 * NIST/SEMATECH e-Handbook 5.5.3.1.4, chemical-yield rotatable central composite design (13 runs):
 * quadratic fit, lack of fit against pure error, R², adjusted and predicted R² (PRESS), the
 * stationary point and the canonical eigenvalues. Published values are printed to 2-4 decimals;
 * full-precision values were reproduced independently (fixture test/fixtures/nist-ehb-chemical-ccd).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze, canonicalAnalysis, contourGrid, quadraticForm, ridgeAnalysis, steepestAscent } from '@/domain/analysis';

const dir = new URL('../../fixtures/nist-ehb-chemical-ccd/', import.meta.url);
const lines = readFileSync(new URL('ccd13.csv', dir), 'utf8').trim().split(/\r?\n/);
const header = lines[0]!.split(',');
const data = lines.slice(1).map((l) => {
  const cells = l.split(',');
  return { x1: Number(cells[header.indexOf('x1')]), x2: Number(cells[header.indexOf('x2')]), yield: Number(cells[header.indexOf('yield')]) };
});
const expected = JSON.parse(readFileSync(new URL('expected.json', dir), 'utf8'));
const pub = expected.published;
const full = expected.computed_full_precision;
const quadratic = ['x1', 'x2', 'x1^2', 'x2^2', 'x1*x2'];

describe('NIST e-Handbook chemical CCD (5.5.3.1.4)', () => {
  const result = analyze({ data, response: 'yield', terms: quadratic });

  it('fits the quadratic model (published to 2 decimals; reproduced to full precision)', () => {
    const est = result.coefficients.map((c) => c.estimate);
    full['coefficients_[b0,x1,x2,x1^2,x2^2,x1x2]'].forEach((v: number, j: number) => expect(est[j]).toBeCloseTo(v, 10));
    const published = pub.fitted_quadratic_coded;
    expect(est[0]!.toFixed(1)).toBe(published.b0.toFixed(1));
    expect(est[1]!.toFixed(2)).toBe(published.x1.toFixed(2));
    expect(est[3]!.toFixed(2)).toBe(published['x1^2'].toFixed(2));
    expect(result.anova.find((r) => r.source === 'Residual')!.ss).toBeCloseTo(full.residual_SS, 9);
  });

  it('tests lack of fit against pure error from the centre runs', () => {
    expect(result.lackOfFit).toBeDefined();
    expect(result.lackOfFit!.lackOfFitDf).toBe(pub.lack_of_fit.quadratic_LOF_df);
    expect(result.lackOfFit!.pureErrorDf).toBe(pub.lack_of_fit.pure_error_df);
    expect(result.lackOfFit!.lackOfFitSs.toFixed(1)).toBe(pub.lack_of_fit.quadratic_LOF_SS.toFixed(1));
    expect(result.lackOfFit!.pureErrorSs).toBeCloseTo(full.pure_error_SS, 9);
    const linear = analyze({ data, response: 'yield', terms: ['x1', 'x2'] });
    expect(linear.lackOfFit!.lackOfFitDf).toBe(pub.lack_of_fit.linear_LOF_df);
    expect(linear.lackOfFit!.lackOfFitSs.toFixed(1)).toBe(pub.lack_of_fit.linear_LOF_SS.toFixed(1));
  });

  it('reports R², adjusted R², root MSE and predicted R² from PRESS', () => {
    const q = pub.fit_statistics.quadratic;
    expect(result.rSquared.toFixed(4)).toBe(q.r2.toFixed(4));
    expect(result.adjustedRSquared.toFixed(4)).toBe(q.adj_r2.toFixed(4));
    expect(result.residualStdError!.toFixed(2)).toBe(q.root_mse.toFixed(2));
    expect(result.press!.toFixed(2)).toBe(q.press.toFixed(2));
    expect(result.predictedRSquared!.toFixed(4)).toBe(q.pred_r2.toFixed(4));
    const linear = analyze({ data, response: 'yield', terms: ['x1', 'x2'] });
    const l = pub.fit_statistics.linear;
    expect(linear.press!.toFixed(2)).toBe(l.press.toFixed(2));
    expect(linear.predictedRSquared!.toFixed(4)).toBe(l.pred_r2.toFixed(4));
    expect(linear.adjustedRSquared.toFixed(4)).toBe(l.adj_r2.toFixed(4));
  });

  it('finds the stationary point, its predicted yield and the canonical eigenvalues (a maximum)', () => {
    const sp = result.stationaryPoint!;
    expect(sp.point[0]).toBeCloseTo(full.stationary_point_coded[0], 9);
    expect(sp.point[1]).toBeCloseTo(full.stationary_point_coded[1], 9);
    expect(sp.point[0]!.toFixed(4)).toBe('-0.9279'); // page: (-0.9278, 0.3468) from rounded coefficients
    expect(sp.predicted.toFixed(2)).toBe(pub.predicted_yield_at_optimum.toFixed(2));
    const can = result.canonical!;
    expect(can.eigenvalues[0]).toBeCloseTo(full.eigenvalues_ascending[0], 9);
    expect(can.eigenvalues[1]).toBeCloseTo(full.eigenvalues_ascending[1], 9);
    expect(can.eigenvalues[0]!.toFixed(4)).toBe(pub.canonical_eigenvalues[1].toFixed(4));
    expect(can.kind).toBe('maximum');
    // Published eigenvector for −4.973 is (0.728, 0.685) up to sign in (X1, X2).
    const v = can.directions[1]!;
    expect(Math.abs(v[0]!)).toBeCloseTo(0.72846, 4);
    expect(Math.abs(v[1]!)).toBeCloseTo(0.685089, 4);
  });

  it('gives a ridge path that climbs to the maximum and a steepest-ascent path and contour grid', () => {
    const ridge = ridgeAnalysis(result, { radii: [0, 0.5, 1, 1.5] });
    expect(ridge.map((r) => Math.hypot(...r.point))).toEqual(ridge.map((r) => expect.closeTo(r.distance, 9)));
    // Within the radius of the stationary point (≈0.99) the ridge climbs; the best on R = 1.5 is below the maximum.
    expect(ridge[2]!.predicted).toBeGreaterThan(ridge[1]!.predicted);
    expect(ridge[3]!.predicted).toBeLessThanOrEqual(result.stationaryPoint!.predicted + 1e-9);
    // On each sphere no point is higher than the ridge point: check against a ring of points.
    const form = quadraticForm(result);
    const f = (x: number[]) => form.constant + form.linear[0]! * x[0]! + form.linear[1]! * x[1]! + form.quadratic[0]![0]! * x[0]! ** 2 + form.quadratic[1]![1]! * x[1]! ** 2 + 2 * form.quadratic[0]![1]! * x[0]! * x[1]!;
    for (let a = 0; a < 360; a += 3) {
      const t = (a * Math.PI) / 180;
      expect(f([Math.cos(t), Math.sin(t)])).toBeLessThanOrEqual(ridge[2]!.predicted + 1e-9);
    }
    expect(canonicalAnalysis(form).eigenvalues).toHaveLength(2);
    const path = steepestAscent(result, { steps: 4, stepSize: 0.25 });
    for (let i = 1; i < path.length; i++) expect(path[i]!.predicted).toBeGreaterThan(path[i - 1]!.predicted);
    const grid = contourGrid(result, 'x1', 'x2', undefined, 11);
    expect(grid.z).toHaveLength(11);
    expect(grid.x[0]).toBeCloseTo(-1.414, 12);
    expect(grid.designPoints).toHaveLength(13);
    expect(grid.designPoints[0]).toEqual({ x: -1, y: -1 });
    const centre = grid.z[5]![5]!;
    expect(centre).toBeCloseTo(result.coefficients[0]!.estimate, 9);
  });
});
