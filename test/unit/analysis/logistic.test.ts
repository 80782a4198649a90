import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { analyze, chisqUpperP } from '@/domain/analysis';

// Invented pass/fail data: did the hop sequence complete (1) or did the robot fall (0)?
const data = [
  { payload: 0.2, gain: 10, ok: 1 }, { payload: 0.4, gain: 20, ok: 1 }, { payload: 0.6, gain: 30, ok: 0 },
  { payload: 0.8, gain: 10, ok: 1 }, { payload: 1.0, gain: 20, ok: 1 }, { payload: 1.2, gain: 30, ok: 0 },
  { payload: 1.4, gain: 10, ok: 0 }, { payload: 1.6, gain: 20, ok: 1 }, { payload: 1.8, gain: 30, ok: 0 },
  { payload: 0.3, gain: 25, ok: 1 }, { payload: 0.9, gain: 15, ok: 0 }, { payload: 1.5, gain: 12, ok: 0 },
  { payload: 0.5, gain: 28, ok: 1 }, { payload: 1.1, gain: 22, ok: 0 }, { payload: 1.9, gain: 14, ok: 0 },
  { payload: 0.1, gain: 18, ok: 1 },
];

/** Independent check: Newton–Raphson on the log-likelihood with ml-matrix. */
function newton(rows: typeof data) {
  const X = new Matrix(rows.map((r) => [1, r.payload, r.gain]));
  const y = Matrix.columnVector(rows.map((r) => r.ok));
  let b = Matrix.zeros(3, 1);
  for (let it = 0; it < 50; it++) {
    const eta = X.mmul(b);
    const mu = eta.to1DArray().map((e) => 1 / (1 + Math.exp(-e)));
    const W = Matrix.diag(mu.map((m) => m * (1 - m)));
    const grad = X.transpose().mmul(Matrix.sub(y, Matrix.columnVector(mu)));
    const info = X.transpose().mmul(W).mmul(X);
    b = Matrix.add(b, inverse(info).mmul(grad));
  }
  const mu = X.mmul(b).to1DArray().map((e) => 1 / (1 + Math.exp(-e)));
  const info = X.transpose().mmul(Matrix.diag(mu.map((m) => m * (1 - m)))).mmul(X);
  return { b: b.to1DArray(), se: inverse(info).diagonal().map(Math.sqrt) };
}

describe('logistic regression (IRLS)', () => {
  const r = analyze({ data, response: 'ok', terms: ['payload', 'gain'], family: 'binomial' });

  it('agrees with an independent Newton–Raphson fit: estimates and Wald standard errors', () => {
    const ref = newton(data);
    r.coefficients.forEach((c, j) => {
      expect(c.estimate).toBeCloseTo(ref.b[j]!, 8);
      expect(c.stdError!).toBeCloseTo(ref.se[j]!, 8);
      expect(c.statistic).toBeCloseTo(c.estimate / c.stdError!, 12);
    });
    expect(r.logistic!.converged).toBe(true);
    expect(r.logistic!.separation).toBeUndefined();
  });

  it('reports likelihood-ratio tests: model and each term against refits without it', () => {
    const model = r.anova.find((a) => a.source === 'Model')!;
    expect(model.ss).toBeCloseTo(r.logistic!.nullDeviance - r.logistic!.deviance, 10);
    expect(model.p).toBeCloseTo(chisqUpperP(model.ss, 2), 14);
    const withoutGain = analyze({ data, response: 'ok', terms: ['payload'], family: 'binomial' });
    const gainRow = r.anova.find((a) => a.source === 'gain')!;
    expect(gainRow.df).toBe(1);
    expect(gainRow.ss).toBeCloseTo(withoutGain.logistic!.deviance - r.logistic!.deviance, 8);
    expect(r.anova.at(-1)!.source).toBe('Total');
    expect(r.logistic!.aic).toBeCloseTo(r.logistic!.deviance + 6, 12);
  });

  it('detects and explains complete separation', () => {
    const separated = data.map((d) => ({ ...d, ok: d.payload < 1 ? 1 : 0 }));
    const s = analyze({ data: separated, response: 'ok', terms: ['payload', 'gain'], family: 'binomial' });
    expect(s.logistic!.separation?.kind).toBe('complete');
    expect(s.logistic!.separation!.terms).toContain('payload');
    expect(s.logistic!.separation!.message).toMatch(/separate/);
  });

  it('detects quasi-complete separation', () => {
    // Every run with payload ≥ 1.5 fails; below that both outcomes occur.
    const quasi = data.map((d) => ({ ...d, ok: d.payload >= 1.5 ? 0 : d.ok }));
    quasi.push({ payload: 1.5, gain: 20, ok: 0 });
    const s = analyze({ data: quasi, response: 'ok', terms: ['payload', 'gain'], family: 'binomial' });
    expect(s.logistic!.separation).toBeUndefined(); // overlapping outcomes here: a finite estimate exists
    const q2 = [...data.map((d) => ({ ...d, cold: d.gain > 25 ? 'yes' : 'no', ok: d.gain > 25 ? 0 : d.ok }))];
    const s2 = analyze({ data: q2, response: 'ok', terms: ['payload', 'cold'], family: 'binomial' });
    expect(s2.logistic!.separation?.kind).toBe('quasi-complete');
    expect(s2.logistic!.separation!.terms.some((t) => t.startsWith('cold'))).toBe(true);
  });

  it('refuses responses other than 0/1', () => {
    expect(() => analyze({ data: data.map((d) => ({ ...d, ok: d.ok * 2 })), response: 'ok', terms: ['payload'], family: 'binomial' })).toThrow(/0 or 1/);
  });
});
