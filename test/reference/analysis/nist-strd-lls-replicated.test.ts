/**
 * NIST Statistical Reference Datasets, linear least squares (NIST StRD LLS, certified values to 15
 * digits; fixtures and SOURCE.md in test/fixtures/nist-strd-lls/), each dataset stacked k times so
 * that n·p exceeds 200,000 and the fit takes the large-problem path (the triangle of [X y] by row
 * chunks, then pivoting on it; or, when the conditioning calls for refinement as with Longley and
 * Filip, the direct factorisation of the whole matrix). Stacking k copies keeps the certified
 * coefficients and R²; the other certified values follow exactly:
 *   residual SS and regression SS × k; residual SD × √(k(n − p) / (kn − p));
 *   standard deviations of the estimates × √((n − p) / (kn − p)); F × (kn − p) / (n − p).
 * Checked as log relative error (LRE) ≥ 9, as for the datasets themselves.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze, buildModelFrame, fitLinearModel } from '@/domain/analysis';

interface Certified {
  parameters: { name: string; estimate: string; std_dev: string }[];
  residual_standard_deviation: string;
  r_squared: string;
  anova_regression: { df: number; ss: string; f: string };
  anova_residual: { df: number; ss: string };
}

function load(name: string) {
  const dir = new URL(`../../fixtures/nist-strd-lls/${name}/`, import.meta.url);
  const csv = readFileSync(new URL('data.csv', dir), 'utf8').trim().split(/\r?\n/);
  const header = csv[0]!.split(',');
  const data = csv.slice(1).map((line) => Object.fromEntries(line.split(',').map((v, j) => [header[j]!, Number(v)])));
  const certified = JSON.parse(readFileSync(new URL('certified.json', dir), 'utf8')) as Certified;
  return { header, data, certified };
}

function lre(estimate: number, certified: number): number {
  if (certified === 0) return estimate === 0 ? 15 : -Math.log10(Math.abs(estimate));
  if (estimate === certified) return 15;
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

const MIN_LRE = 9;

const cases: Record<string, { terms: (header: string[]) => string[]; chunked: boolean }> = {
  norris: { terms: () => ['x'], chunked: true },
  pontius: { terms: () => ['x', 'x^2'], chunked: true },
  wampler1: { terms: () => ['x', 'x^2', 'x^3', 'x^4', 'x^5'], chunked: true },
  wampler3: { terms: () => ['x', 'x^2', 'x^3', 'x^4', 'x^5'], chunked: true },
  longley: { terms: (h) => h.slice(1), chunked: false },
  filip: { terms: () => ['x', ...Array.from({ length: 9 }, (_, d) => `x^${d + 2}`)], chunked: false },
};

describe('NIST StRD linear least squares stacked past 200,000 matrix entries: certified values, LRE ≥ 9', () => {
  for (const [name, spec] of Object.entries(cases)) {
    it(name, () => {
      const { header, data, certified } = load(name);
      const n0 = data.length;
      const p = certified.parameters.length;
      const k = Math.ceil(200_001 / (n0 * p));
      const stacked = Array.from({ length: k }, () => data).flat();
      const n = k * n0;
      const terms = spec.terms(header);
      const request = { data: stacked, response: 'y', terms };
      // The path taken: the chunked triangle serves problems whose R has a 1-norm condition number
      // of at most 1e4 (no refinement needed); the others are refined on the whole matrix.
      const lm = fitLinearModel(buildModelFrame(request));
      expect(lm.fit.factorisation).toBe(spec.chunked ? 'row-chunks' : 'whole-matrix');

      const result = analyze(request);
      expect(result.rank).toBe(p);
      const sdFactor = Math.sqrt((n0 - p) / (n - p));
      certified.parameters.forEach((param, j) => {
        const c = result.coefficients[j]!;
        expect(lre(c.estimate, Number(param.estimate)), `${param.name} estimate`).toBeGreaterThanOrEqual(MIN_LRE);
        expect(lre(c.stdError!, Number(param.std_dev) * sdFactor), `${param.name} standard deviation`).toBeGreaterThanOrEqual(MIN_LRE);
      });
      const residualSd = Number(certified.residual_standard_deviation) * Math.sqrt((k * (n0 - p)) / (n - p));
      expect(lre(result.residualStdError!, residualSd), 'residual SD').toBeGreaterThanOrEqual(MIN_LRE);
      expect(lre(result.rSquared, Number(certified.r_squared)), 'R²').toBeGreaterThanOrEqual(MIN_LRE);
      const model = result.anova.find((r) => r.source === 'Model')!;
      const residual = result.anova.find((r) => r.source === 'Residual')!;
      expect(model.df).toBe(certified.anova_regression.df);
      expect(residual.df).toBe(n - p);
      expect(lre(model.ss, k * Number(certified.anova_regression.ss)), 'regression SS').toBeGreaterThanOrEqual(MIN_LRE);
      expect(lre(residual.ss, k * Number(certified.anova_residual.ss)), 'residual SS').toBeGreaterThanOrEqual(MIN_LRE);
      if (certified.anova_regression.f === 'Infinity') {
        // An exact fit: F is infinite (or beyond 1e15 when rounding leaves a tiny residual).
        expect(model.f === Infinity || model.f! > 1e15).toBe(true);
      } else {
        expect(lre(model.f!, (Number(certified.anova_regression.f) * (n - p)) / (n0 - p)), 'F').toBeGreaterThanOrEqual(MIN_LRE);
      }
    });
  }
});
