// References: CCD axial distances (Box & Hunter 1957; NIST e-Handbook 5.3.3.6.1; Myers & Montgomery),
// test/fixtures/ccd-alpha/SOURCE.md; Box–Behnken designs (Box & Behnken 1960), test/fixtures/box-behnken/SOURCE.md
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { boxBehnkenDesign, centralCompositeDesign, generateDesign, orthogonalAlpha, rotatableAlpha } from '@/domain/design';

interface CcdRow {
  k: number;
  fraction_p: number;
  factorial_runs: number;
  axial_runs: number;
  alpha_rotatable: number;
  alpha_orthogonal_by_n0: Record<string, number>;
  total_runs_by_n0: Record<string, number>;
}
const ccd = JSON.parse(readFileSync(new URL('../../fixtures/ccd-alpha/ccd_alpha.json', import.meta.url), 'utf8')) as { table: CcdRow[] };

interface BbdRow {
  k: number;
  edge_runs: number;
  recommended_center_points: number;
  runs_with_centers: number;
  quadratic_model_terms: number;
  rotatable: boolean;
}
const bbd = JSON.parse(readFileSync(new URL('../../fixtures/box-behnken/bbd.json', import.meta.url), 'utf8')) as BbdRow[];

const factorsOf = (k: number): Factor[] => Array.from({ length: k }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous', low: -1, high: 1 }));

describe('central composite axial distances (Box & Hunter 1957; NIST e-Handbook 5.3.3.6.1)', () => {
  for (const row of ccd.table) {
    it(`k = ${row.k}, cube 2^(${row.k}-${row.fraction_p}): rotatable α = ${row.alpha_rotatable}, orthogonal α for n0 = 1..6, run counts`, () => {
      expect(rotatableAlpha(row.factorial_runs)).toBeCloseTo(row.alpha_rotatable, 6);
      for (const [n0, alpha] of Object.entries(row.alpha_orthogonal_by_n0)) {
        expect(orthogonalAlpha(row.factorial_runs, row.k, Number(n0))).toBeCloseTo(alpha, 5);
        const d = centralCompositeDesign(factorsOf(row.k), {
          alpha: 'orthogonal',
          centerPoints: Number(n0),
          resolution: row.fraction_p === 0 ? row.k + 1 : 5,
        });
        expect(d.cubeRuns).toBe(row.factorial_runs);
        expect(d.runs).toHaveLength(row.total_runs_by_n0[n0]!);
        expect(d.alpha).toBeCloseTo(alpha, 5);
      }
    });
  }

  it('the default cube is the full factorial up to 4 factors and the smallest resolution V fraction from 5', () => {
    const defaults = ccd.table.filter((r) => r.k <= 4 || (r.fraction_p > 0 && r.k >= 5) || r.k === 8);
    for (const row of defaults) {
      if (row.k >= 5 && row.k < 8 && row.fraction_p === 0) continue;
      expect(centralCompositeDesign(factorsOf(row.k)).cubeRuns).toBe(row.factorial_runs);
    }
  });

  it('rotatable designs satisfy the fourth-moment condition Σ x_i^4 = 3 Σ x_i^2 x_j^2 (k = 2..6)', () => {
    for (const k of [2, 3, 4, 5, 6]) {
      const runs = centralCompositeDesign(factorsOf(k), { alpha: 'rotatable', centerPoints: 2 }).runs.map((r) => r.coded);
      const s4 = runs.reduce((s, r) => s + r[0]! ** 4, 0);
      const s22 = runs.reduce((s, r) => s + r[0]! ** 2 * r[1]! ** 2, 0);
      expect(s4 / (3 * s22)).toBeCloseTo(1, 10);
    }
  });

  it('orthogonal α makes the centred pure-quadratic columns orthogonal (k = 3, n0 = 4)', () => {
    const runs = centralCompositeDesign(factorsOf(3), { alpha: 'orthogonal', centerPoints: 4 }).runs.map((r) => r.coded);
    const col = (j: number) => {
      const v = runs.map((r) => r[j]! ** 2);
      const m = v.reduce((a, b) => a + b, 0) / v.length;
      return v.map((x) => x - m);
    };
    const a = col(0);
    const b = col(1);
    expect(a.reduce((s, x, i) => s + x * b[i]!, 0)).toBeCloseTo(0, 10);
  });

  it('blocks a CCD orthogonally into cube and axial blocks: block effects uncorrelated with the model columns', () => {
    const d = generateDesign({ factors: factorsOf(3), method: 'central-composite', blocks: 2, centerPoints: 2, seed: 4 });
    expect(d.runs.filter((r) => r.block === 1)).toHaveLength(8 + 2);
    expect(d.runs.filter((r) => r.block === 2)).toHaveLength(6 + 2);
    const { labels, values } = d.diagnostics.correlation;
    const b = labels.indexOf('Block[1]');
    for (let j = 0; j < labels.length; j++) if (j !== b) expect(Math.abs(values[b]![j]!)).toBeLessThan(1e-12);
  });
});

describe('Box–Behnken designs (Box & Behnken 1960)', () => {
  for (const row of bbd) {
    it(`k = ${row.k}: ${row.edge_runs} edge runs + ${row.recommended_center_points} centre runs = ${row.runs_with_centers}, same runs as the published construction`, () => {
      const runs = boxBehnkenDesign(factorsOf(row.k));
      expect(runs).toHaveLength(row.runs_with_centers);
      const csv = readFileSync(new URL(`../../fixtures/box-behnken/bbd${row.k}.csv`, import.meta.url), 'utf8').trim().split('\n').slice(1);
      const ours = runs.slice(0, row.edge_runs).map((r) => r.coded.join(',')).sort();
      expect(ours).toEqual(csv.map((line) => line.split(',').map(Number).join(',')).sort());
      // No corner runs; estimable full quadratic model.
      for (const r of runs) expect(r.coded.filter((c) => c !== 0).length).toBeLessThan(row.k);
      const d = generateDesign({ factors: factorsOf(row.k), method: 'box-behnken', seed: 1 });
      expect(d.diagnostics.parameters).toBe(row.quadratic_model_terms);
      // Rotatable when Σ x_i^4 = 3 Σ x_i^2 x_j^2 for every pair of factors.
      const coded = runs.map((r) => r.coded);
      let rotatable = true;
      for (let a = 0; a < row.k; a++) {
        for (let b = a + 1; b < row.k; b++) {
          const s4 = coded.reduce((s, r) => s + r[a]! ** 4, 0);
          const s22 = coded.reduce((s, r) => s + r[a]! ** 2 * r[b]! ** 2, 0);
          if (Math.abs(s4 / (3 * s22) - 1) > 1e-12) rotatable = false;
        }
      }
      expect(rotatable).toBe(row.rotatable);
    });
  }
});
