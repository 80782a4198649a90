/**
 * Quantile and tail functions against the NIST/SEMATECH e-Handbook critical-value tables
 * (1.3.6.7.2-4; values to 15 digits as computed with mpmath and spot-checked against the published
 * 3-decimal entries; fixture test/fixtures/distribution-quantiles with its SOURCE.md).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  chisqCdf, chisqQuantile, chisqUpperP, fQuantile, fUpperP, normalCdf, normalQuantile, tCdf, tQuantile, tTwoSidedP,
} from '@/domain/analysis';

const table = JSON.parse(readFileSync(new URL('../../fixtures/distribution-quantiles/quantiles.json', import.meta.url), 'utf8')) as {
  t_upper: Record<string, Record<string, string>>;
  F_upper: Record<string, Record<string, string>>;
  chi2_upper: Record<string, Record<string, string>>;
};

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

const TOL = 1e-12;

describe('distribution quantiles: NIST e-Handbook critical values', () => {
  it('t upper critical values and two-sided tail probabilities', () => {
    let worst = 0;
    for (const [nu, row] of Object.entries(table.t_upper)) {
      for (const [alpha, value] of Object.entries(row)) {
        const a = Number(alpha);
        const x = Number(value);
        const q = nu === 'inf' ? normalQuantile(1 - a) : tQuantile(1 - a, Number(nu));
        worst = Math.max(worst, rel(q, x));
        if (nu !== 'inf') {
          expect(rel(tTwoSidedP(x, Number(nu)), 2 * a), `t tail nu=${nu} alpha=${alpha}`).toBeLessThan(TOL);
          expect(rel(1 - tCdf(x, Number(nu)), a)).toBeLessThan(1e-10);
        }
      }
    }
    expect(worst).toBeLessThan(TOL);
    expect(tQuantile(0.975, 10).toFixed(3)).toBe('2.228'); // published table entry
  });

  it('F upper critical values and upper-tail probabilities', () => {
    let worst = 0;
    for (const [alpha, row] of Object.entries(table.F_upper)) {
      for (const [dfs, value] of Object.entries(row)) {
        const [d1, d2] = dfs.split(',').map(Number) as [number, number];
        const x = Number(value);
        worst = Math.max(worst, rel(fQuantile(1 - Number(alpha), d1, d2), x));
        expect(rel(fUpperP(x, d1, d2), Number(alpha)), `F tail ${dfs} alpha=${alpha}`).toBeLessThan(TOL);
      }
    }
    expect(worst).toBeLessThan(TOL);
    expect(fQuantile(0.95, 3, 30).toFixed(3)).toBe('2.922'); // published table entry
  });

  it('chi-square critical values, including the lower 5% point', () => {
    let worst = 0;
    for (const [nu, row] of Object.entries(table.chi2_upper)) {
      for (const [alpha, value] of Object.entries(row)) {
        const x = Number(value);
        const lower = alpha.startsWith('lower_tail_');
        const a = lower ? 1 - Number(alpha.slice('lower_tail_'.length)) : Number(alpha);
        worst = Math.max(worst, rel(chisqQuantile(1 - a, Number(nu)), x));
        expect(rel(chisqUpperP(x, Number(nu)), a), `chi2 tail nu=${nu} ${alpha}`).toBeLessThan(TOL);
        if (lower) expect(rel(chisqCdf(x, Number(nu)), 1 - a)).toBeLessThan(TOL);
      }
    }
    expect(worst).toBeLessThan(TOL);
    expect(chisqQuantile(0.95, 10).toFixed(3)).toBe('18.307'); // published table entry
  });

  it('normal distribution: quantile and cdf are inverse; symmetric tails', () => {
    for (const p of [1e-100, 1e-20, 1e-10, 0.001, 0.025, 0.3, 0.5, 0.9, 0.999]) expect(rel(normalCdf(normalQuantile(p)), p)).toBeLessThan(TOL);
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 14); // from memory (Φ⁻¹(0.975))
  });
});
