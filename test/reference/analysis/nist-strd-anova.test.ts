/**
 * NIST Statistical Reference Datasets, one-way analysis of variance (NIST StRD ANOVA: SmLs01-09
 * after Simon & Lesage 1989, SiRstv, AtmWtAg; certified values to 15 digits): between- and
 * within-treatment sums of squares, mean squares, F, R² and residual SD with LRE ≥ 9.
 * Fixtures are copied with their SOURCE.md into test/fixtures/nist-strd-anova/.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze } from '@/domain/analysis';

interface Certified {
  dataset: string;
  source_file: string;
  between: { df: number; ss: string; ms: string; f: string };
  within: { df: number; ss: string; ms: string };
  r_squared: string;
  residual_standard_deviation: string;
}

function load(folder: string) {
  const dir = new URL(`../../fixtures/nist-strd-anova/${folder}/`, import.meta.url);
  const certified = JSON.parse(readFileSync(new URL('certified.json', dir), 'utf8')) as Certified;
  const lines = readFileSync(new URL(certified.source_file, dir), 'utf8').split(/\r?\n/);
  // NIST layout: the data block starts on line 61.
  const data = lines
    .slice(60)
    .map((l) => l.trim())
    .filter(Boolean)
    .map((l) => {
      const [t, y] = l.split(/\s+/);
      return { treatment: `t${t}`, response: Number(y) };
    });
  return { data, certified };
}

function lre(estimate: number, certified: number): number {
  if (certified === 0) return estimate === 0 ? 15 : -Math.log10(Math.abs(estimate));
  if (estimate === certified) return 15;
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

describe('NIST StRD one-way ANOVA: certified values, LRE ≥ 9', () => {
  const sets = ['smls01', 'smls02', 'smls03', 'smls04', 'smls05', 'smls06', 'smls07', 'smls08', 'smls09', 'sirstv', 'atmwtag'];
  for (const folder of sets) {
    it(folder, () => {
      const { data, certified } = load(folder);
      const result = analyze({ data, response: 'response', terms: ['treatment'], diagnostics: false });
      const between = result.anova.find((r) => r.source === 'treatment')!;
      const model = result.anova.find((r) => r.source === 'Model')!;
      const within = result.anova.find((r) => r.source === 'Residual')!;
      expect(between.df).toBe(certified.between.df);
      expect(within.df).toBe(certified.within.df);
      for (const row of [between, model]) {
        expect(lre(row.ss, Number(certified.between.ss)), `${row.source} SS`).toBeGreaterThanOrEqual(9);
        expect(lre(row.ms!, Number(certified.between.ms)), `${row.source} MS`).toBeGreaterThanOrEqual(9);
        expect(lre(row.f!, Number(certified.between.f)), `${row.source} F`).toBeGreaterThanOrEqual(9);
      }
      expect(lre(within.ss, Number(certified.within.ss)), 'within SS').toBeGreaterThanOrEqual(9);
      expect(lre(within.ms!, Number(certified.within.ms)), 'within MS').toBeGreaterThanOrEqual(9);
      expect(lre(result.rSquared, Number(certified.r_squared)), 'R²').toBeGreaterThanOrEqual(9);
      expect(lre(result.residualStdError!, Number(certified.residual_standard_deviation)), 'residual SD').toBeGreaterThanOrEqual(9);
    });
  }
});
