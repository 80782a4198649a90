/**
 * NIST Statistical Reference Datasets, linear least squares (NIST StRD LLS, certified values to
 * 15 digits): every dataset, checked as log relative error (LRE) ≥ 9 for the coefficients, their
 * standard deviations, the residual standard deviation, R² and the ANOVA sums of squares and F.
 * Fixtures are copied with their SOURCE.md into test/fixtures/nist-strd-lls/.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze } from '@/domain/analysis';

interface Certified {
  dataset: string;
  parameters: { name: string; estimate: string; std_dev: string }[];
  residual_standard_deviation: string;
  r_squared: string;
  anova_regression: { df: number; ss: string; ms: string; f: string };
  anova_residual: { df: number; ss: string; ms: string };
}

function load(name: string) {
  const dir = new URL(`../../fixtures/nist-strd-lls/${name}/`, import.meta.url);
  const csv = readFileSync(new URL('data.csv', dir), 'utf8').trim().split(/\r?\n/);
  const header = csv[0]!.split(',');
  const data = csv.slice(1).map((line) => Object.fromEntries(line.split(',').map((v, j) => [header[j]!, Number(v)])));
  const certified = JSON.parse(readFileSync(new URL('certified.json', dir), 'utf8')) as Certified;
  return { header, data, certified };
}

/** LRE = −log10(|estimate − certified| / |certified|); absolute error when the certified value is 0. */
function lre(estimate: number, certified: number): number {
  if (certified === 0) return estimate === 0 ? 15 : -Math.log10(Math.abs(estimate));
  if (estimate === certified) return 15;
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

const polynomial: Record<string, { degree: number; intercept: boolean }> = {
  norris: { degree: 1, intercept: true },
  pontius: { degree: 2, intercept: true },
  noint1: { degree: 1, intercept: false },
  noint2: { degree: 1, intercept: false },
  filip: { degree: 10, intercept: true },
  wampler1: { degree: 5, intercept: true },
  wampler2: { degree: 5, intercept: true },
  wampler3: { degree: 5, intercept: true },
};

const MIN_LRE = 9;

describe('NIST StRD linear least squares: certified values, LRE ≥ 9', () => {
  for (const name of ['norris', 'pontius', 'noint1', 'noint2', 'filip', 'longley', 'wampler1', 'wampler2', 'wampler3']) {
    it(name, () => {
      const { header, data, certified } = load(name);
      const poly = polynomial[name];
      const terms = poly
        ? Array.from({ length: poly.degree }, (_, d) => (d === 0 ? 'x' : `x^${d + 1}`))
        : header.slice(1);
      const result = analyze({ data, response: 'y', terms, intercept: poly ? poly.intercept : true });
      expect(result.rank).toBe(certified.parameters.length);
      expect(result.coefficients).toHaveLength(certified.parameters.length);
      certified.parameters.forEach((param, j) => {
        const c = result.coefficients[j]!;
        expect(lre(c.estimate, Number(param.estimate)), `${param.name} estimate`).toBeGreaterThanOrEqual(MIN_LRE);
        expect(lre(c.stdError!, Number(param.std_dev)), `${param.name} standard deviation`).toBeGreaterThanOrEqual(MIN_LRE);
      });
      expect(lre(result.residualStdError!, Number(certified.residual_standard_deviation)), 'residual SD').toBeGreaterThanOrEqual(MIN_LRE);
      expect(lre(result.rSquared, Number(certified.r_squared)), 'R²').toBeGreaterThanOrEqual(MIN_LRE);
      const model = result.anova.find((r) => r.source === 'Model')!;
      const residual = result.anova.find((r) => r.source === 'Residual')!;
      expect(model.df).toBe(certified.anova_regression.df);
      expect(residual.df).toBe(certified.anova_residual.df);
      expect(lre(model.ss, Number(certified.anova_regression.ss)), 'regression SS').toBeGreaterThanOrEqual(MIN_LRE);
      expect(lre(residual.ss, Number(certified.anova_residual.ss)), 'residual SS').toBeGreaterThanOrEqual(MIN_LRE);
      if (certified.anova_regression.f === 'Infinity') {
        // An exact fit: F is infinite (or beyond 1e15 when rounding leaves a residual of 1e-20).
        expect(model.f === Infinity || model.f! > 1e15).toBe(true);
      } else {
        expect(lre(model.f!, Number(certified.anova_regression.f)), 'F').toBeGreaterThanOrEqual(MIN_LRE);
      }
      expect(result.anova.at(-1)!.source).toBe('Total');
    });
  }
});
