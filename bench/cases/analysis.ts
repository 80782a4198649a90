import type { BenchCase } from '../types';
import { analyze, buildModelFrame, fitLinearModel, type AnalysisResult, type LinearModelFit } from '../../src/domain/analysis';

/**
 * OLS with ANOVA on 100,000 runs × 30 terms (intercept + 29 predictors). The data come from a
 * fixed formula that bench/reference/analysis_ols.py evaluates identically:
 *   x_j(i) = sin(0.001·(i + 1)·(j + 1.3) + j),  j = 1..29
 *   y(i)   = Σ_j ((j mod 7) − 3)/10 · x_j(i) + 0.1·sin(12.9898·(i + 1))
 */
const N = 100_000;
const P = 29;

function makeData(): Record<string, number>[] {
  const rows: Record<string, number>[] = new Array(N);
  for (let i = 0; i < N; i++) {
    const row: Record<string, number> = {};
    let y = 0.1 * Math.sin(12.9898 * (i + 1));
    for (let j = 1; j <= P; j++) {
      const x = Math.sin(0.001 * (i + 1) * (j + 1.3) + j);
      row[`x${j}`] = x;
      y += (((j % 7) - 3) / 10) * x;
    }
    row.y = y;
    rows[i] = row;
  }
  return rows;
}

const terms = Array.from({ length: P }, (_, j) => `x${j + 1}`);

export const cases: BenchCase[] = [
  {
    name: 'analysis: OLS + ANOVA, 100,000 runs × 30 terms (from row objects)',
    target: 'faster than statsmodels, ≤ 3× numpy lstsq',
    setup: makeData,
    run: (data) => analyze({ data: data as Record<string, number>[], response: 'y', terms, diagnostics: false }),
    warmup: 1,
    repeats: 5,
    reference: { script: 'analysis_ols.py', label: 'statsmodels OLS + per-term F (numpy lstsq in the same run)', maxRatio: 1 },
    report: (_, last) => {
      const r = last as AnalysisResult;
      return { rSquared: r.rSquared, b1: r.coefficients[1]!.estimate, residualDf: r.residualDf };
    },
  },
  {
    name: 'analysis: OLS + ANOVA, 100,000 × 30, from a built model matrix (fit only)',
    target: 'faster than statsmodels, ≤ 3× numpy lstsq',
    setup: () => buildModelFrame({ data: makeData(), response: 'y', terms }),
    run: (frame) => fitLinearModel(frame as ReturnType<typeof buildModelFrame>),
    warmup: 1,
    repeats: 5,
    reference: { script: 'analysis_ols.py', label: 'statsmodels OLS + per-term F (numpy lstsq in the same run)', maxRatio: 1 },
    report: (_, last) => ({ rSquared: (last as LinearModelFit).rSquared }),
  },
];
