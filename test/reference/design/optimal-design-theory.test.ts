// Reference: Kiefer & Wolfowitz (1960) equivalence theorem; Guest (1958) and Hoel (1958) D-optimal
// polynomial supports; Atkinson & Donev 2-factor quadratic weights (test/fixtures/optimal-design-theory/SOURCE.md)
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { generateDesign } from '@/domain/design';

const expected = JSON.parse(readFileSync(new URL('../../fixtures/optimal-design-theory/expected.json', import.meta.url), 'utf8')) as {
  approximate_D_optimal: { model?: string; det_M?: number | string; weights?: unknown }[];
  exact_D_optimal_quadratic_1d_computed: Record<string, { det_XtX: number }>;
};

const x: Factor = { name: 'x', kind: 'continuous', low: -1, high: 1 };

function detNormalised(points: number[], degree: number): number {
  const p = degree + 1;
  const m = Array.from({ length: p }, (_, a) => Array.from({ length: p }, (_, b) => points.reduce((s, v) => s + v ** (a + b), 0) / points.length));
  let d = 1;
  for (let c = 0; c < p; c++) {
    for (let i = c + 1; i < p; i++) {
      const f = m[i]![c]! / m[c]![c]!;
      for (let j = c; j < p; j++) m[i]![j]! -= f * m[c]![j]!;
    }
    d *= m[c]![c]!;
  }
  return d;
}

function maxStandardisedVariance(points: number[], degree: number): number {
  // max over a fine grid of d(x) = f(x)' M^-1 f(x), M = X'X / N, by solving M y = f(x).
  const p = degree + 1;
  const n = points.length;
  const m = Array.from({ length: p }, (_, a) => Array.from({ length: p }, (_, b) => points.reduce((s, v) => s + v ** (a + b), 0) / n));
  let best = 0;
  for (let g = 0; g <= 2000; g++) {
    const t = -1 + g / 1000;
    const f = Array.from({ length: p }, (_, a) => t ** a);
    const a = m.map((row, i) => [...row, f[i]!]);
    for (let c = 0; c < p; c++) {
      for (let i = c + 1; i < p; i++) {
        const k = a[i]![c]! / a[c]![c]!;
        for (let j = c; j <= p; j++) a[i]![j]! -= k * a[c]![j]!;
      }
    }
    const y = new Array<number>(p).fill(0);
    for (let i = p - 1; i >= 0; i--) {
      let s = a[i]![p]!;
      for (let j = i + 1; j < p; j++) s -= a[i]![j]! * y[j]!;
      y[i] = s / a[i]![i]!;
    }
    best = Math.max(best, f.reduce((s, v, i) => s + v * y[i]!, 0));
  }
  return best;
}

describe('optimal-design theory (Kiefer & Wolfowitz 1960; Guest 1958; Hoel 1958)', () => {
  const supports: [number, number[], number][] = [
    [1, [-1, 1], 1.0],
    [2, [-1, 0, 1], 4 / 27],
    [3, [-1, -1 / Math.sqrt(5), 1 / Math.sqrt(5), 1], 0.00512],
    [4, [-1, -Math.sqrt(3 / 7), 0, Math.sqrt(3 / 7), 1], 4.2972182387562e-5],
  ];
  for (const [degree, support, detM] of supports) {
    it(`degree ${degree}: equal weights on the published support give det M = ${detM.toPrecision(5)} and max d(x) = p (equivalence theorem)`, () => {
      expect(detNormalised(support, degree)).toBeCloseTo(detM, 12);
      expect(maxStandardisedVariance(support, degree)).toBeCloseTo(degree + 1, 9);
    });
  }
  it('the table agrees with the values above', () => {
    expect(expected.approximate_D_optimal[0]!.det_M).toBe(1);
    expect(expected.approximate_D_optimal[2]!.det_M).toBe(0.00512);
  });

  it('G-efficiency of the D-optimal 3-point quadratic design is 1 (max SPV = p at the support)', () => {
    const three = generateDesign({ factors: [x], method: 'optimal', model: 'quadratic', runs: 3, seed: 1 });
    expect(three.runs.map((r) => r.coded[0]).sort()).toEqual([-1, 0, 1]);
    expect(three.diagnostics.gEfficiency).toBeCloseTo(1, 9);
  });

  for (const [key, value] of Object.entries(expected.exact_D_optimal_quadratic_1d_computed).filter(([k]) => /^N\d+$/.test(k))) {
    const n = Number(key.slice(1));
    it(`exact D-optimal ${n}-run design for the 1-D quadratic reaches |X'X| = ${value.det_XtX}`, () => {
      const d = generateDesign({ factors: [x], method: 'optimal', model: 'quadratic', runs: n, seed: n });
      expect(Math.exp(d.diagnostics.optimal!.value)).toBeCloseTo(value.det_XtX, 8);
    });
  }

  it('a large exact design for the 2-factor quadratic approaches the approximate D-optimum (corner / edge / centre weights)', () => {
    const entry = expected.approximate_D_optimal.find((e) => String(e.model).startsWith('full quadratic in 2 factors'))!;
    const weights = entry.weights as Record<string, number>;
    const n = 52;
    const d = generateDesign({
      factors: [x, { name: 'y', kind: 'continuous', low: -1, high: 1 }],
      method: 'optimal',
      model: 'quadratic',
      runs: n,
      seed: 11,
      starts: 10,
    });
    const detM = Math.exp(d.diagnostics.optimal!.value) / n ** 6;
    const efficiency = (detM / Number(entry.det_M)) ** (1 / 6);
    expect(efficiency).toBeGreaterThan(0.995);
    expect(efficiency).toBeLessThanOrEqual(1 + 1e-9);
    const kind = (r: { coded: number[] }) => r.coded.filter((c) => c !== 0).length;
    const share = (k: number, count: number) => d.runs.filter((r) => kind(r) === k).length / n / count;
    expect(Math.abs(share(2, 4) - weights['each of 4 corners']!)).toBeLessThan(0.01);
    expect(Math.abs(share(1, 4) - weights['each of 4 edge midpoints']!)).toBeLessThan(0.01);
    expect(Math.abs(share(0, 1) - weights['centre']!)).toBeLessThan(0.03);
    // Equivalence theorem for the exact design: max d(x) close to p = 6.
    expect(d.diagnostics.gEfficiency).toBeGreaterThan(0.9);
  });
});
