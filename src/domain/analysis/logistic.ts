/**
 * Pass/fail responses: logistic regression by iteratively reweighted least squares (each step a
 * pivoted-QR weighted fit), Wald z tests and intervals, likelihood-ratio tests for the model and
 * for each term, and detection of complete and quasi-complete separation, where no finite
 * maximum-likelihood estimate exists.
 */
// Nelder & Wedderburn (1972), J. R. Stat. Soc. A 135:370-384 (IRLS); Albert & Anderson (1984), Biometrika 71:1-10 (separation)
import { invalidInput } from '../errors';
import { chisqUpperP, normalQuantile, normalUpperP } from './distributions';
import { leastSquares } from './least-squares';
import type { ModelFrame } from './model-frame';
import type { AnovaRow, CoefficientRow } from './types';

export interface Separation {
  kind: 'complete' | 'quasi-complete';
  /** Runs whose outcome the model predicts with certainty (indices in the fitted order). */
  certainRuns: number[];
  /** Terms whose estimates grow without bound. */
  terms: string[];
  message: string;
}

export interface LogisticFit {
  coefficients: CoefficientRow[];
  aliased: string[];
  anova: AnovaRow[];
  deviance: number;
  nullDeviance: number;
  aic: number;
  iterations: number;
  converged: boolean;
  fitted: Float64Array;
  residuals: Float64Array;
  residualDf: number;
  rank: number;
  separation?: Separation;
  covariance: number[][];
}

function binaryDeviance(y: Float64Array, mu: Float64Array): number {
  let d = 0;
  for (let i = 0; i < y.length; i++) {
    const m = mu[i]!;
    if (y[i] === 1) d -= 2 * Math.log(Math.max(m, 1e-300));
    else d -= 2 * Math.log(Math.max(1 - m, 1e-300));
  }
  return d;
}

interface IrlsResult {
  beta: Float64Array;
  basis: number[];
  aliased: number[];
  cov: Float64Array;
  mu: Float64Array;
  eta: Float64Array;
  deviance: number;
  iterations: number;
  converged: boolean;
}

/** IRLS on the columns `cols` of the frame's model matrix. */
function irls(frame: ModelFrame, cols: number[], maxIterations = 60): IrlsResult {
  const { n } = frame;
  const y = frame.y;
  const p = cols.length;
  const eta = new Float64Array(n);
  const mu = new Float64Array(n);
  let ybar = 0;
  for (let i = 0; i < n; i++) ybar += y[i]!;
  ybar /= n;
  const start = Math.log((ybar * n + 0.5) / ((1 - ybar) * n + 0.5));
  for (let i = 0; i < n; i++) {
    eta[i] = frame.intercept ? start : 0;
    mu[i] = 1 / (1 + Math.exp(-eta[i]!));
  }
  let deviance = binaryDeviance(y, mu);
  let beta: Float64Array = new Float64Array(p);
  let basis: number[] = [];
  let aliased: number[] = [];
  let cov: Float64Array = new Float64Array(0);
  let converged = false;
  let it = 0;
  const xw = new Float64Array(n * p);
  const zw = new Float64Array(n);
  for (it = 1; it <= maxIterations; it++) {
    for (let i = 0; i < n; i++) {
      const m = mu[i]!;
      const w = Math.max(m * (1 - m), 1e-12);
      const sw = Math.sqrt(w);
      zw[i] = sw * (eta[i]! + (y[i]! - m) / w);
      for (let j = 0; j < p; j++) xw[j * n + i] = sw * frame.x[cols[j]! * n + i]!;
    }
    const fit = leastSquares(xw, zw, n, p, { refinementSteps: 1, refineCovariance: false });
    beta = fit.coefficients;
    basis = fit.basis;
    aliased = fit.aliased;
    cov = fit.unscaledCovariance;
    for (let i = 0; i < n; i++) {
      let e = 0;
      for (const j of basis) e += frame.x[cols[j]! * n + i]! * beta[j]!;
      eta[i] = e;
      mu[i] = 1 / (1 + Math.exp(-e));
    }
    const next = binaryDeviance(y, mu);
    const change = Math.abs(next - deviance);
    deviance = next;
    if (converged) break;
    // Converged: one more step, so that the estimates are polished and the covariance is taken at
    // the weights of the converged estimate (not of the step before it).
    if (change <= 1e-10 * (Math.abs(next) + 0.1)) converged = true;
  }
  return { beta, basis, aliased, cov, mu, eta, deviance, iterations: Math.min(it, maxIterations), converged };
}

/** Fit a logistic model to a frame whose response is 0/1. */
export function fitLogisticModel(frame: ModelFrame): LogisticFit {
  const { n, model } = frame;
  for (let i = 0; i < n; i++) {
    const v = frame.y[i];
    if (v !== 0 && v !== 1) throw invalidInput(`data[${frame.rowIndex[i]}]`, `a pass/fail response must be 0 or 1 (1 = passed, e.g. hop sequence completed); row ${frame.rowIndex[i]} has ${v}`);
  }
  const allCols = Array.from({ length: frame.p }, (_, j) => j);
  const full = irls(frame, allCols);
  const rank = full.basis.length;
  const residualDf = n - rank;
  // Separation: runs predicted with certainty and estimates that keep growing.
  const certainRuns: number[] = [];
  for (let i = 0; i < n; i++) if (Math.abs(full.eta[i]!) > 15) certainRuns.push(i);
  let separation: Separation | undefined;
  // Coefficients beyond 8 per unit (odds ratio e^16 across a coded half-range) signal divergence.
  const big = full.basis.filter((j) => model.terms[model.termOfColumn[j]!]!.parts.length > 0 && Math.abs(full.beta[j]!) > 8);
  if (certainRuns.length > 0 && (full.deviance < 1e-6 || !full.converged || big.length > 0)) {
    const kind = certainRuns.length === n || full.deviance < 1e-6 ? 'complete' : 'quasi-complete';
    const terms = big.map((j) => model.labels[j]!);
    separation = {
      kind,
      certainRuns,
      terms,
      message:
        kind === 'complete'
          ? `the factors separate passes from failures completely (${n} of ${n} runs predicted with certainty${terms.length ? `, driven by ${terms.join(', ')}` : ''}); no finite estimate exists, so estimates, standard errors and tests are not meaningful. Add runs between the settings that pass and those that fail, or drop terms.`
          : `${certainRuns.length} of ${n} runs are predicted with certainty (quasi-complete separation${terms.length ? ` by ${terms.join(', ')}` : ''}); those estimates drift to infinity and their tests are not meaningful. Add runs where those settings can both pass and fail.`,
    };
  }
  const z975 = normalQuantile(0.975);
  const coefficients: CoefficientRow[] = full.basis.map((j, pos) => {
    const est = full.beta[j]!;
    const se = Math.sqrt(full.cov[pos * rank + pos]!);
    const z = est / se;
    return {
      term: model.labels[j]!,
      modelTerm: model.terms[model.termOfColumn[j]!]!.label,
      estimate: est,
      stdError: se,
      statistic: z,
      p: 2 * normalUpperP(Math.abs(z)),
      ci95: [est - z975 * se, est + z975 * se],
    };
  });
  // Null model: intercept only (or nothing).
  let nullDeviance: number;
  {
    let ybar = 0;
    for (let i = 0; i < n; i++) ybar += frame.y[i]!;
    ybar /= n;
    const mu0 = new Float64Array(n).fill(frame.intercept ? ybar : 0.5);
    nullDeviance = binaryDeviance(frame.y, mu0);
  }
  const anova: AnovaRow[] = [];
  const modelDf = rank - (frame.intercept ? 1 : 0);
  if (modelDf > 0) {
    const lr = Math.max(0, nullDeviance - full.deviance);
    anova.push({ source: 'Model', df: modelDf, ss: lr, ms: null, f: null, p: chisqUpperP(lr, modelDf) });
  }
  // Likelihood-ratio test of each term: refit without its columns.
  model.terms.forEach((t, ti) => {
    if (t.parts.length === 0) return;
    const own = allCols.filter((j) => model.termOfColumn[j] === ti && full.basis.includes(j));
    if (own.length === 0) return;
    const reduced = irls(frame, allCols.filter((j) => model.termOfColumn[j] !== ti));
    const df = own.length - (reduced.aliased.length - full.aliased.filter((j) => model.termOfColumn[j] !== ti).length);
    const lr = Math.max(0, reduced.deviance - full.deviance);
    anova.push({ source: t.label, df, ss: lr, ms: null, f: null, p: df > 0 ? chisqUpperP(lr, df) : null });
  });
  anova.push({ source: 'Residual', df: residualDf, ss: full.deviance, ms: null, f: null, p: null });
  anova.push({ source: 'Total', df: n - (frame.intercept ? 1 : 0), ss: nullDeviance, ms: null, f: null, p: null });
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = frame.y[i]! - full.mu[i]!;
  const covariance = Array.from({ length: rank }, (_, a) => Array.from({ length: rank }, (_, b) => full.cov[a * rank + b]!));
  return {
    coefficients,
    aliased: full.aliased.map((j) => model.labels[j]!),
    anova,
    deviance: full.deviance,
    nullDeviance,
    aic: full.deviance + 2 * rank,
    iterations: full.iterations,
    converged: full.converged,
    fitted: full.mu,
    residuals,
    residualDf,
    rank,
    separation,
    covariance,
  };
}
