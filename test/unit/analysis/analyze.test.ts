import fc from 'fast-check';
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { analyze, type AnalysisRequest } from '@/domain/analysis';
import { isDomainError } from '@/domain/errors';

// A 2² factorial with three centre runs: hop height (mm) against payload and gain, invented.
const factorialWithCentre = [
  { payload: -1, gain: -1, height: 28 },
  { payload: 1, gain: -1, height: 36 },
  { payload: -1, gain: 1, height: 18 },
  { payload: 1, gain: 1, height: 31 },
  { payload: 0, gain: 0, height: 29 },
  { payload: 0, gain: 0, height: 31 },
  { payload: 0, gain: 0, height: 30 },
];

function row(result: ReturnType<typeof analyze>, source: string) {
  const r = result.anova.find((a) => a.source === source);
  if (!r) throw new Error(`no ANOVA row ${source}`);
  return r;
}

describe('analyze: ordinary least squares and ANOVA', () => {
  it('estimates orthogonal effects as contrasts and splits the residual into lack of fit and pure error', () => {
    const result = analyze({ data: factorialWithCentre, response: 'height', terms: ['payload', 'gain', 'payload*gain'] });
    const est = Object.fromEntries(result.coefficients.map((c) => [c.term, c.estimate]));
    expect(est['(Intercept)']).toBeCloseTo(203 / 7, 12);
    expect(est.payload).toBeCloseTo((36 + 31 - 28 - 18) / 4, 12);
    expect(est.gain).toBeCloseTo((18 + 31 - 28 - 36) / 4, 12);
    expect(est['payload*gain']).toBeCloseTo((28 + 31 - 36 - 18) / 4, 12);
    expect(result.n).toBe(7);
    expect(result.residualDf).toBe(3);
    // Pure error: centre runs 29, 31, 30 → SS 2 on 2 df; lack of fit takes the remaining 1 df (curvature).
    expect(row(result, 'Pure error').ss).toBeCloseTo(2, 12);
    expect(row(result, 'Pure error').df).toBe(2);
    expect(row(result, 'Lack of fit').df).toBe(1);
    expect(row(result, 'Lack of fit').ss + 2).toBeCloseTo(row(result, 'Residual').ss, 10);
    expect(result.lackOfFit?.groups).toBe(5);
    // Term SS of an orthogonal design: 4·b² each; they add up to the model SS.
    expect(row(result, 'payload').ss).toBeCloseTo(4 * 5.25 ** 2, 10);
    const termSs = ['payload', 'gain', 'payload*gain'].reduce((s, t) => s + row(result, t).ss, 0);
    expect(termSs).toBeCloseTo(row(result, 'Model').ss, 9);
    expect(row(result, 'Model').ss + row(result, 'Residual').ss).toBeCloseTo(row(result, 'Total').ss, 9);
    expect(result.anova.map((a) => a.source)).toEqual(['Model', 'payload', 'gain', 'payload*gain', 'Residual', 'Lack of fit', 'Pure error', 'Total']);
    const c = result.coefficients[1]!;
    expect(c.ci95![0]).toBeLessThan(c.estimate);
    expect(c.statistic).toBeCloseTo(c.estimate / c.stdError!, 12);
    expect(result.fitted.length).toBe(7);
    expect(result.residuals.reduce((s, r) => s + r, 0)).toBeCloseTo(0, 10);
  });

  it('treats a string column as categorical with levels in order of appearance (one-way ANOVA)', () => {
    const data = [
      { surface: 'grass', eff: 0.31 }, { surface: 'ice', eff: 0.22 }, { surface: 'glass', eff: 0.27 },
      { surface: 'grass', eff: 0.35 }, { surface: 'ice', eff: 0.2 }, { surface: 'glass', eff: 0.25 },
      { surface: 'grass', eff: 0.33 }, { surface: 'ice', eff: 0.24 },
    ];
    const result = analyze({ data, response: 'eff', terms: ['surface'] });
    expect(result.factors[0]).toMatchObject({ kind: 'categorical', levels: ['grass', 'ice', 'glass'] });
    expect(result.coefficients.map((c) => c.term)).toEqual(['(Intercept)', 'surface[grass]', 'surface[ice]']);
    // Between-group SS by hand: Σ n_g (ȳ_g − ȳ)².
    const groups = { grass: [0.31, 0.35, 0.33], ice: [0.22, 0.2, 0.24], glass: [0.27, 0.25] };
    const all = Object.values(groups).flat();
    const mean = all.reduce((a, b) => a + b, 0) / all.length;
    let between = 0;
    let within = 0;
    for (const g of Object.values(groups)) {
      const m = g.reduce((a, b) => a + b, 0) / g.length;
      between += g.length * (m - mean) ** 2;
      within += g.reduce((s, v) => s + (v - m) ** 2, 0);
    }
    expect(row(result, 'surface').df).toBe(2);
    expect(row(result, 'surface').ss).toBeCloseTo(between, 12);
    expect(row(result, 'Residual').ss).toBeCloseTo(within, 12);
    expect(row(result, 'surface').f).toBeCloseTo(between / 2 / (within / 5), 9);
    // Replicates of each level are the pure error, but no lack of fit is left: the model is saturated in groups.
    expect(result.anova.some((a) => a.source === 'Lack of fit')).toBe(false);
  });

  it('reports aliased columns of a half fraction instead of failing', () => {
    // 2^(3-1) with C = AB: the AB interaction is aliased with C.
    const data = [
      { a: -1, b: -1, c: 1, y: 5 }, { a: 1, b: -1, c: -1, y: 7 },
      { a: -1, b: 1, c: -1, y: 4 }, { a: 1, b: 1, c: 1, y: 9 },
    ];
    const result = analyze({ data, response: 'y', terms: ['a', 'b', 'c', 'a*b'] });
    expect(result.rank).toBe(4);
    expect(result.aliased).toEqual(['a*b']);
    expect(result.coefficients.map((c) => c.term)).toEqual(['(Intercept)', 'a', 'b', 'c']);
    expect(result.residualDf).toBe(0);
    expect(result.coefficients[1]!.stdError).toBeNull();
    expect(result.residualStdError).toBeNull();
  });

  it('codes numeric factors onto [-1, 1] when factor definitions are given', () => {
    const data = [
      { payload: 0, gain: 10, h: 30 }, { payload: 2, gain: 10, h: 22 },
      { payload: 0, gain: 30, h: 35 }, { payload: 2, gain: 30, h: 26 }, { payload: 1, gain: 20, h: 28 },
    ];
    const request: AnalysisRequest = {
      data,
      response: 'h',
      terms: ['payload', 'gain'],
      factors: [
        { name: 'payload', kind: 'continuous', low: 0, high: 2 },
        { name: 'gain', kind: 'continuous', low: 10, high: 30 },
      ],
    };
    const coded = analyze(request);
    expect(coded.coding).toBe('coded');
    expect(coded.coefficients[1]!.estimate).toBeCloseTo((22 + 26 - 30 - 35) / 4, 12);
    const natural = analyze({ ...request, coding: 'natural' });
    expect(natural.coefficients[1]!.estimate).toBeCloseTo((22 + 26 - 30 - 35) / 4, 12); // per g over a 1 g half-range
    expect(natural.coefficients[2]!.estimate).toBeCloseTo(coded.coefficients[2]!.estimate / 10, 12);
    expect(natural.rSquared).toBeCloseTo(coded.rSquared, 12);
  });

  it('leaves out rows with an empty response and names bad input', () => {
    const data = [...factorialWithCentre, { payload: 1, gain: 1, height: '' as unknown as number }];
    const result = analyze({ data, response: 'height', terms: ['payload', 'gain'] });
    expect(result.n).toBe(7);
    expect(result.excludedRows).toEqual([7]);
    const bad = () => analyze({ data: [{ x: 1, y: 'tall' }, { x: 2, y: 3 }], response: 'y', terms: ['x'] });
    expect(bad).toThrow(/finite number/);
    try {
      bad();
    } catch (e) {
      expect(isDomainError(e) && e.field).toBe('data[0].y');
    }
    expect(() => analyze({ data: factorialWithCentre, response: 'height', terms: ['payload+gain'] })).toThrow(/cannot read term/);
    expect(() => analyze({ data: factorialWithCentre, response: 'height', terms: ['speed'] })).toThrow(/no row of data/);
    expect(() => analyze({ data: factorialWithCentre, response: 'height', terms: ['x'], family: 'binomial' as const, intercept: true })).toThrow();
  });

  it('agrees with a direct solve on random well-conditioned problems; residuals are orthogonal to the columns', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true })), { minLength: 8, maxLength: 30 }),
        (rows) => {
          const data = rows.map(([a, b, e], i) => ({ a: a + (i % 3), b: b * (1 + (i % 2)), y: 1 + 2 * a - b + 0.1 * e }));
          const result = analyze({ data, response: 'y', terms: ['a', 'b'] });
          const X = new Matrix(data.map((d) => [1, d.a, d.b]));
          const Y = Matrix.columnVector(data.map((d) => d.y));
          const xtx = X.transpose().mmul(X);
          if (xtx.get(1, 1) * xtx.get(2, 2) - xtx.get(1, 2) ** 2 < 1e-6) return; // nearly collinear draw
          const direct = solve(xtx, X.transpose().mmul(Y));
          result.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(direct.get(j, 0), 6));
          for (const col of [0, 1, 2]) {
            const dotv = data.reduce((s, _d, i) => s + X.get(i, col) * result.residuals[i]!, 0);
            expect(Math.abs(dotv)).toBeLessThan(1e-10);
          }
          expect(result.rSquared).toBeLessThanOrEqual(1 + 1e-12);
        },
      ),
      { numRuns: 60, seed: 20261202 },
    );
  });

  it('solves large well-conditioned problems without refinement to the same answer as a direct solve', () => {
    const n = 4100;
    const names = Array.from({ length: 49 }, (_, j) => `x${j + 1}`);
    const data = Array.from({ length: n }, (_, i) => {
      const row: Record<string, number> = {};
      let y = 0.05 * Math.sin(7.1 * (i + 1));
      names.forEach((nm, j) => {
        row[nm] = Math.sin(0.37 * (i + 1) * (j + 1.1) + j);
        y += ((j % 5) - 2) * row[nm]!;
      });
      row.y = y;
      return row;
    });
    const result = analyze({ data, response: 'y', terms: names, diagnostics: false });
    const X = new Matrix(data.map((d) => [1, ...names.map((nm) => d[nm]!)]));
    const direct = solve(X.transpose().mmul(X), X.transpose().mmul(Matrix.columnVector(data.map((d) => d.y!))));
    result.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(direct.get(j, 0), 9));
    expect(result.residualDf).toBe(n - 50);
  });
});
