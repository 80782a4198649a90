// References: maximin Latin hypercubes (Morris & Mitchell 1995; exhaustive values in
// test/fixtures/maximin-lhd/SOURCE.md); Sobol points with Joe & Kuo (2008) direction numbers
// (test/fixtures/sobol-joe-kuo/SOURCE.md, computed with an independent implementation)
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { seededRandom } from '@/domain/random';
import { generateDesign, maximinLatinHypercube, minimumDistance, phiP, sobolPoints } from '@/domain/design';

interface StoredDesign {
  n: number;
  d: number;
  design_levels_0_to_n_minus_1: number[][];
  phi_p15_integer_levels: number;
  min_sq_dist: number;
}
const lhd = JSON.parse(readFileSync(new URL('../../fixtures/maximin-lhd/maximin_lhd.json', import.meta.url), 'utf8')) as Record<string, unknown> & {
  exact_maximin_by_exhaustive_search: { n: number; d: number; max_min_sq_dist: number; min_J1_among_maximin: number }[];
};
// The stored designs (see SOURCE.md for where they come from).
const storedDesigns = Object.entries(lhd).find(([key]) => key.startsWith('designs_from'))![1] as StoredDesign[];
const sobol = JSON.parse(readFileSync(new URL('../../fixtures/sobol-joe-kuo/sobol_16d_256.json', import.meta.url), 'utf8')) as { points_times_2_pow_30: number[][] };

describe('maximin Latin hypercubes (Morris & Mitchell 1995)', () => {
  it('φp reproduces the stored φ15 of the reference designs (distances, not squared distances)', () => {
    for (const d of storedDesigns.slice(0, 30)) {
      expect(phiP(d.design_levels_0_to_n_minus_1, 15)).toBeCloseTo(d.phi_p15_integer_levels, 9);
      expect(minimumDistance(d.design_levels_0_to_n_minus_1).squared).toBe(d.min_sq_dist);
    }
  });

  const small = lhd.exact_maximin_by_exhaustive_search.filter((r) => (r.d === 2 && r.n <= 9) || (r.d === 3 && r.n <= 6) || (r.d === 4 && r.n <= 5));
  for (const r of small) {
    it(`n = ${r.n}, d = ${r.d}: reaches the exact maximin squared distance ${r.max_min_sq_dist}${r.d === 2 && r.n <= 7 ? ` with the fewest pairs (${r.min_J1_among_maximin})` : ''}`, () => {
      const x = maximinLatinHypercube(r.n, r.d, seededRandom(r.n * 31 + r.d));
      for (let c = 0; c < r.d; c++) expect(x.map((row) => row[c]).sort((a, b) => a! - b!)).toEqual(Array.from({ length: r.n }, (_, i) => i));
      const m = minimumDistance(x);
      expect(m.squared).toBe(r.max_min_sq_dist);
      if (r.d === 2 && r.n <= 7) expect(m.pairs).toBe(r.min_J1_among_maximin);
    });
  }

  it('never beats the exact maximin value (property: random seeds, 2-D n = 8)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 100000 }), (seed) => {
        const x = maximinLatinHypercube(8, 2, seededRandom(seed), { restarts: 1, iterations: 300 });
        expect(minimumDistance(x).squared).toBeLessThanOrEqual(8);
      }),
      { numRuns: 20 },
    );
  });

  it('gives a Latin hypercube in natural units through generateDesign, reproducible from its seed', () => {
    const factors: Factor[] = [
      { name: 'payload', kind: 'continuous', low: 0, high: 2 },
      { name: 'gain', kind: 'continuous', low: 10, high: 30 },
    ];
    const d = generateDesign({ factors, method: 'latin-hypercube', runs: 9, seed: 5 });
    expect(new Set(d.runs.map((r) => r.values.payload))).toEqual(new Set(Array.from({ length: 9 }, (_, i) => (2 * i) / 8)));
    // Within one step of the exact optimum (10) for n = 9 in 2-D.
    const m = minimumDistance(d.runs.map((r) => r.coded.map((c) => Math.round(((c + 1) * 8) / 2)))).squared;
    expect(m).toBeGreaterThanOrEqual(8);
    expect(m).toBeLessThanOrEqual(10);
    expect(JSON.stringify(generateDesign({ factors, method: 'latin-hypercube', runs: 9, seed: 5 }))).toBe(JSON.stringify(d));
  });
});

describe('Sobol points (Sobol 1967; Joe & Kuo 2008 direction numbers)', () => {
  it('reproduce the reference points exactly (256 points, 16 dimensions, Gray-code order)', () => {
    const ours = sobolPoints(256, 16).map((row) => row.map((v) => Math.round(v * 2 ** 30)));
    expect(ours).toEqual(sobol.points_times_2_pow_30);
  });

  it('scrambled points keep the net property: every 1-D projection of the first 2^m points is stratified, and so are pairs', () => {
    const m = 6;
    const n = 2 ** m;
    const pts = sobolPoints(n, 6, seededRandom(12));
    for (let j = 0; j < 6; j++) expect(new Set(pts.map((p) => Math.floor(p[j]! * n))).size).toBe(n);
    // Dimensions 1 and 2 form a (0, m, 2)-net: every 2^a × 2^(m−a) box holds exactly one point.
    for (let a = 0; a <= m; a++) {
      const cells = new Set(pts.map((p) => `${Math.floor(p[0]! * 2 ** a)},${Math.floor(p[1]! * 2 ** (m - a))}`));
      expect(cells.size).toBe(n);
    }
    expect(sobolPoints(8, 3, seededRandom(12))).toEqual(sobolPoints(8, 3, seededRandom(12)));
    expect(sobolPoints(8, 3, seededRandom(13))).not.toEqual(sobolPoints(8, 3, seededRandom(12)));
  });

  it('fills a constrained region with mixed factors, every run inside the constraints', () => {
    const factors: Factor[] = [
      { name: 'payload', kind: 'continuous', low: 0, high: 2 },
      { name: 'gain', kind: 'continuous', low: 10, high: 30 },
      { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass'] },
    ];
    const d = generateDesign({ factors, method: 'sobol', runs: 32, seed: 2, constraints: [{ terms: { payload: 1, gain: 0.02 }, max: 2.4 }] });
    expect(d.runs).toHaveLength(32);
    for (const r of d.runs) expect((r.values.payload as number) + 0.02 * (r.values.gain as number)).toBeLessThanOrEqual(2.4 + 1e-9);
    expect(new Set(d.runs.map((r) => r.values.surface)).size).toBe(3);
  });
});
