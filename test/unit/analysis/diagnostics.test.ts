import { describe, expect, it } from 'vitest';
import { analyze, predictor } from '@/domain/analysis';

// Invented hop-efficiency data with one unusual run (index 6).
const data = [
  { payload: 0.1, gain: 10, eff: 0.41 }, { payload: 0.4, gain: 12, eff: 0.38 }, { payload: 0.8, gain: 15, eff: 0.35 },
  { payload: 1.2, gain: 11, eff: 0.3 }, { payload: 1.5, gain: 18, eff: 0.29 }, { payload: 1.9, gain: 20, eff: 0.24 },
  { payload: 0.6, gain: 25, eff: 0.5 }, { payload: 1.0, gain: 14, eff: 0.33 }, { payload: 1.7, gain: 9, eff: 0.25 },
  { payload: 0.3, gain: 16, eff: 0.4 },
];
const terms = ['payload', 'gain'];

describe('regression diagnostics', () => {
  const full = analyze({ data, response: 'eff', terms });
  const d = full.diagnostics!;

  it('leverages sum to the number of coefficients and lie in [0, 1]', () => {
    expect(d.leverage.reduce((a, b) => a + b, 0)).toBeCloseTo(3, 12);
    for (const h of d.leverage) expect(h).toBeGreaterThanOrEqual(0);
  });

  it('matches leave-one-out refits: PRESS residuals, external studentisation and Cook’s distance', () => {
    let press = 0;
    const s2 = full.residualStdError! ** 2;
    data.forEach((_, i) => {
      const rest = data.filter((_, k) => k !== i);
      const loo = analyze({ data: rest, response: 'eff', terms });
      const pr = predictor(loo);
      const predictedOut = pr.predict(data[i]!);
      const e = data[i]!.eff - predictedOut;
      press += e * e;
      // External studentised residual: e_i / (s_(i) √(1 − h_i)).
      const ext = full.residuals[i]! / (loo.residualStdError! * Math.sqrt(1 - d.leverage[i]!));
      expect(d.studentizedResiduals[i]).toBeCloseTo(ext, 10);
      // Cook's distance: Σ_j (ŷ_j − ŷ_j(i))² / (p s²).
      let shift = 0;
      data.forEach((row, j) => { shift += (full.fitted[j]! - pr.predict(row)) ** 2; });
      expect(d.cooksDistance[i]).toBeCloseTo(shift / (3 * s2), 10);
    });
    expect(full.press).toBeCloseTo(press, 12);
    expect(full.predictedRSquared).toBeLessThan(full.rSquared);
  });

  it('gives normal-plot data in ascending order with symmetric Blom positions', () => {
    const q = d.normalPlot.map((p) => p.theoretical);
    expect(q).toHaveLength(10);
    for (let i = 1; i < q.length; i++) expect(d.normalPlot[i]!.residual).toBeGreaterThanOrEqual(d.normalPlot[i - 1]!.residual);
    expect(q[0]).toBeCloseTo(-q[9]!, 12);
    expect(q[4]).toBeLessThan(0);
  });

  it('can be turned off for large data', () => {
    const r = analyze({ data, response: 'eff', terms, diagnostics: false });
    expect(r.diagnostics).toBeUndefined();
    expect(r.press).toBeUndefined();
  });
});
