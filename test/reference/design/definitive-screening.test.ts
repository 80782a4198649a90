// References: Jones & Nachtsheim (2011); Xiao, Lin & Bai (2012); Paley (1933) conference matrices
// (test/fixtures/definitive-screening/SOURCE.md)
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { conferenceMatrix, definitiveScreeningDesign, generateDesign } from '@/domain/design';

interface Props {
  m: number;
  conference_order: number;
  runs: number | null;
  max_abs_corr_quad_quad: number | null;
  max_abs_corr_2FI_2FI: number | null;
}
const dsd = JSON.parse(readFileSync(new URL('../../fixtures/definitive-screening/dsd.json', import.meta.url), 'utf8')) as { dsd_properties: Props[] };

const factorsOf = (m: number): Factor[] => Array.from({ length: m }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous', low: -1, high: 1 }));

function corr(a: number[], b: number[]): number {
  const n = a.length;
  const ma = a.reduce((s, v) => s + v, 0) / n;
  const mb = b.reduce((s, v) => s + v, 0) / n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    sab += (a[i]! - ma) * (b[i]! - mb);
    saa += (a[i]! - ma) ** 2;
    sbb += (b[i]! - mb) ** 2;
  }
  return sab / Math.sqrt(saa * sbb);
}

describe('conference matrices (Paley 1933)', () => {
  for (const order of [4, 6, 8, 10, 12, 14, 18, 20, 24]) {
    it(`order ${order}: zero diagonal, ±1 elsewhere, C'C = (n − 1) I${order === 10 ? '' : ', equal to the stored matrix'}`, () => {
      const c = conferenceMatrix(order);
      for (let i = 0; i < order; i++) {
        expect(c[i]![i]).toBe(0);
        for (let j = 0; j < order; j++) {
          if (i !== j) expect(Math.abs(c[i]![j]!)).toBe(1);
          const dotij = c.reduce((s, row) => s + row[i]! * row[j]!, 0);
          expect(dotij).toBe(i === j ? order - 1 : 0);
        }
      }
      if (order !== 10) {
        const text = readFileSync(new URL(`../../fixtures/definitive-screening/conference_${order}.csv`, import.meta.url), 'utf8');
        const stored = text.trim().split('\n').map((l) => l.split(',').map(Number));
        expect(c).toEqual(stored);
      }
    });
  }
});

describe('definitive screening designs (Jones & Nachtsheim 2011; Xiao, Lin & Bai 2012)', () => {
  for (const row of dsd.dsd_properties.filter((r) => typeof r.runs === 'number')) {
    it(`m = ${row.m}: ${row.runs} runs, three zeros per column, main effects orthogonal to each other, to 2FIs and to quadratics`, () => {
      const x = definitiveScreeningDesign(factorsOf(row.m)).map((r) => r.coded);
      expect(x).toHaveLength(row.runs!);
      const col = (j: number) => x.map((r) => r[j]!);
      for (let a = 0; a < row.m; a++) {
        expect(col(a).filter((v) => v === 0)).toHaveLength(3);
        for (let b = 0; b < row.m; b++) {
          if (a !== b) expect(x.reduce((s, r) => s + r[a]! * r[b]!, 0)).toBe(0);
          expect(x.reduce((s, r) => s + r[a]! * r[b]! ** 2, 0)).toBe(0);
          for (let c = b + 1; c < row.m; c++) expect(x.reduce((s, r) => s + r[a]! * r[b]! * r[c]!, 0)).toBe(0);
        }
      }
      if (row.m <= 12) {
        let quad = 0;
        for (let a = 0; a < row.m; a++) for (let b = a + 1; b < row.m; b++) quad = Math.max(quad, Math.abs(corr(col(a).map((v) => v * v), col(b).map((v) => v * v))));
        expect(quad).toBeCloseTo(row.max_abs_corr_quad_quad!, 5);
      }
    });
  }

  it('takes added runs from a larger conference matrix, and two-level categorical factors with a split centre run', () => {
    const more = definitiveScreeningDesign(factorsOf(6), { runs: 17 });
    expect(more).toHaveLength(17);
    const factors: Factor[] = [...factorsOf(5), { name: 'surface', kind: 'categorical', levels: ['turf', 'ice'] }];
    const d = generateDesign({ factors, method: 'definitive-screening', seed: 3 });
    expect(d.runs).toHaveLength(2 * 6 + 2);
    expect(d.runs.filter((r) => r.values.surface === 'ice')).toHaveLength(7);
    // Continuous main effects stay orthogonal to each other and to the categorical column's products.
    const x = d.runs.map((r) => r.coded.map((v, j) => (j === 5 ? 2 * v - 1 : v)));
    for (let a = 0; a < 5; a++) {
      for (let b = 0; b < 5; b++) if (a !== b) expect(x.reduce((s, r) => s + r[a]! * r[b]!, 0)).toBe(0);
      expect(x.reduce((s, r) => s + r[a]! * r[5]! * r[(a + 1) % 5]!, 0)).toBe(0);
      expect(x.reduce((s, r) => s + r[5]! * r[a]! ** 2, 0)).toBe(0);
    }
    expect(d.diagnostics.parameters).toBe(7);
  });
});
