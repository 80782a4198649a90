/**
 * Ordinary least squares for a model frame: coefficients with standard errors, t, p and 95%
 * intervals; an ANOVA table with the model, each term's partial F (the extra sum of squares of the
 * term given all others), the residual split into lack of fit and pure error when settings repeat,
 * and the total; R², adjusted R² and the residual standard error.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { accurateMean, decimalRemainder, sumOfSquaredDeviations } from './compensated';
import { fUpperP, tQuantile, tTwoSidedP } from './distributions';
import { leastSquares, type LeastSquaresFit, type LeastSquaresOptions } from './least-squares';
import type { ModelFrame } from './model-frame';
import type { AnovaRow, CoefficientRow, LackOfFit } from './types';

export interface LinearModelFit {
  frame: ModelFrame;
  fit: LeastSquaresFit;
  coefficients: CoefficientRow[];
  aliased: string[];
  anova: AnovaRow[];
  rSquared: number;
  adjustedRSquared: number;
  residualStdError: number | null;
  residualDf: number;
  meanSquaredError: number;
  lackOfFit?: LackOfFit;
  /** Σ(y − ȳ)² with an intercept, Σy² without. */
  totalSs: number;
}

function upperP(f: number, df1: number, df2: number): number | null {
  if (!(df1 > 0) || !(df2 > 0) || Number.isNaN(f)) return null;
  return fUpperP(f, df1, df2);
}

function ratio(ms: number, mse: number): number | null {
  if (Number.isNaN(ms) || Number.isNaN(mse)) return null;
  if (mse === 0) return ms === 0 ? null : Infinity;
  return ms / mse;
}

/** Extra sum of squares of a set of basis positions: b_Jᵀ (V_JJ)⁻¹ b_J with V = (XᵀX)⁻¹. */
function partialSs(fit: LeastSquaresFit, positions: number[]): number {
  const rank = fit.rank;
  const k = positions.length;
  const b = positions.map((pos) => fit.coefficients[fit.basis[pos]!]!);
  if (k === 1) return (b[0]! * b[0]!) / fit.unscaledCovariance[positions[0]! * rank + positions[0]!]!;
  const v = new Matrix(k, k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) v.set(i, j, fit.unscaledCovariance[positions[i]! * rank + positions[j]!]!);
  const chol = new CholeskyDecomposition(v);
  const sol = chol.solve(Matrix.columnVector(b));
  let ss = 0;
  for (let i = 0; i < k; i++) ss += b[i]! * sol.get(i, 0);
  return ss;
}

/**
 * Runs grouped by their values in the given columns: an open-addressing table (hash of the values'
 * bits, linear probing, exact comparison on a hash match), typed arrays only, no per-run objects.
 */
function groupRuns(cols: readonly Float64Array[], n: number): { groupOf: Int32Array; groups: number } {
  const buf = new Float64Array(1);
  const bits = new Uint32Array(buf.buffer);
  const k = cols.length;
  const same = (a: number, b: number) => {
    for (let j = 0; j < k; j++) if (cols[j]![a] !== cols[j]![b]) return false;
    return true;
  };
  let size = 16;
  while (size < 2 * n) size *= 2;
  const mask = size - 1;
  const table = new Int32Array(size).fill(-1);
  const groupOf = new Int32Array(n);
  const representative = new Int32Array(n);
  let groups = 0;
  for (let i = 0; i < n; i++) {
    let h = 0x811c9dc5;
    for (let j = 0; j < k; j++) {
      const v = cols[j]![i]!;
      buf[0] = v === 0 ? 0 : v; // −0 and 0 alike
      h = Math.imul(h ^ bits[0]!, 0x01000193);
      h = Math.imul(h ^ bits[1]!, 0x01000193);
    }
    h ^= h >>> 15;
    let slot = h & mask;
    for (;;) {
      const g = table[slot]!;
      if (g < 0) {
        table[slot] = groups;
        representative[groups] = i;
        groupOf[i] = groups++;
        break;
      }
      if (same(representative[g]!, i)) {
        groupOf[i] = g;
        break;
      }
      slot = (slot + 1) & mask;
    }
  }
  return { groupOf, groups };
}

/** Pure-error sum of squares from runs that share the same factor setting. */
function pureError(frame: ModelFrame, y: Float64Array): { ss: number; df: number; groups: number } {
  const cols = frame.factorColumns;
  const n = frame.n;
  // Runs that differ in the first factor differ in their setting: when every value of it is
  // distinct (as in observational data) there are no replicates, without hashing the rest.
  if (cols.length > 1 && groupRuns(cols.slice(0, 1), n).groups === n) return { ss: 0, df: 0, groups: n };
  const { groupOf, groups } = groupRuns(cols, n);
  if (groups === n) return { ss: 0, df: 0, groups };
  // Two passes per group: mean, then squared deviations with the usual correction term.
  const count = new Float64Array(groups);
  const sum = new Float64Array(groups);
  for (let i = 0; i < n; i++) {
    count[groupOf[i]!]++;
    sum[groupOf[i]!] += y[i]!;
  }
  const dev = new Float64Array(groups);
  const sq = new Float64Array(groups);
  for (let i = 0; i < n; i++) {
    const g = groupOf[i]!;
    const d = y[i]! - sum[g]! / count[g]!;
    dev[g] += d;
    sq[g] += d * d;
  }
  let ss = 0;
  for (let g = 0; g < groups; g++) if (count[g]! > 1) ss += sq[g]! - (dev[g]! * dev[g]!) / count[g]!;
  return { ss, df: n - groups, groups };
}

/**
 * y − shift; when the data share many leading digits (spread below 1e-4 of the level), each value
 * is taken as the decimal it was written as, so its low-order digits survive the subtraction.
 */
function shiftedResponse(y: Float64Array, shift: number): Float64Array {
  const n = y.length;
  const out = new Float64Array(n);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const d = y[i]! - shift;
    out[i] = d;
    ss += d * d;
  }
  const rms = Math.sqrt(ss / n);
  if (Math.abs(shift) > 1e4 * rms) {
    for (let i = 0; i < y.length; i++) out[i] = out[i]! + decimalRemainder(y[i]!);
  }
  return out;
}

export function fitLinearModel(frame: ModelFrame, options: LeastSquaresOptions = {}): LinearModelFit {
  const { n, p, model, intercept } = frame;
  // With an intercept, fit y − shift (shift ≈ ȳ): an exact or nearly exact subtraction that keeps
  // data with many constant leading digits (e.g. 1000000000000.4) from losing them in the sums.
  let shift = intercept ? accurateMean(frame.y) : 0;
  let yShifted = shift === 0 ? frame.y : shiftedResponse(frame.y, shift);
  let fit = leastSquares(frame.x, yShifted, n, p, { xLow: frame.lowParts, ...options });
  if (shift !== 0 && !fit.basis.includes(0)) {
    // The intercept column itself was judged aliased: fit the data as they are.
    shift = 0;
    yShifted = frame.y;
    fit = leastSquares(frame.x, yShifted, n, p, { xLow: frame.lowParts, ...options });
  }
  const shiftedFitted = fit.fitted;
  if (shift !== 0) {
    const fitted = new Float64Array(n);
    for (let i = 0; i < n; i++) fitted[i] = shiftedFitted[i]! + shift;
    fit.fitted = fitted;
    fit.coefficients[0] += shift;
  }
  const rank = fit.rank;
  const residualDf = n - rank;
  const rss = fit.residualSumOfSquares;
  const mse = residualDf > 0 ? rss / residualDf : NaN;
  const hasError = residualDf > 0;
  const tCrit = hasError ? tQuantile(0.975, residualDf) : NaN;

  const coefficients: CoefficientRow[] = fit.basis.map((col, pos) => {
    const estimate = fit.coefficients[col]!;
    const term = model.terms[model.termOfColumn[col]!]!.label;
    if (!hasError) return { term: model.labels[col]!, modelTerm: term, estimate, stdError: null, statistic: null, p: null, ci95: null };
    const se = Math.sqrt(mse * fit.unscaledCovariance[pos * rank + pos]!);
    const t = se > 0 ? estimate / se : estimate === 0 ? NaN : estimate > 0 ? Infinity : -Infinity;
    return {
      term: model.labels[col]!,
      modelTerm: term,
      estimate,
      stdError: se,
      statistic: Number.isNaN(t) ? null : t,
      p: Number.isNaN(t) ? null : tTwoSidedP(t, residualDf),
      ci95: [estimate - tCrit * se, estimate + tCrit * se],
    };
  });
  const aliased = fit.aliased.map((col) => model.labels[col]!);

  // Sums of squares: total about the mean (or about zero without an intercept), model from the fitted values.
  const ybar = intercept ? accurateMean(yShifted) : 0;
  const totalSs = sumOfSquaredDeviations(yShifted, ybar);
  const modelSs = sumOfSquaredDeviations(shiftedFitted, ybar);
  const interceptInBasis = intercept && fit.basis.includes(0);
  const modelDf = rank - (interceptInBasis ? 1 : 0);
  const totalDf = n - (intercept ? 1 : 0);
  const anova: AnovaRow[] = [];
  if (modelDf > 0) {
    const ms = modelSs / modelDf;
    const f = ratio(ms, mse);
    anova.push({ source: 'Model', df: modelDf, ss: modelSs, ms, f, p: f === null ? null : upperP(f, modelDf, residualDf) });
  }
  // Each term: its columns that are in the basis.
  const posOfColumn = new Map(fit.basis.map((col, pos) => [col, pos]));
  model.terms.forEach((t, ti) => {
    if (t.parts.length === 0) return;
    const positions: number[] = [];
    model.termOfColumn.forEach((owner, col) => {
      if (owner === ti && posOfColumn.has(col)) positions.push(posOfColumn.get(col)!);
    });
    if (positions.length === 0) return;
    const ss = partialSs(fit, positions);
    const df = positions.length;
    const ms = ss / df;
    const f = ratio(ms, mse);
    anova.push({ source: t.label, df, ss, ms, f, p: f === null ? null : upperP(f, df, residualDf) });
  });
  anova.push({ source: 'Residual', df: residualDf, ss: rss, ms: hasError ? mse : null, f: null, p: null });
  let lackOfFit: LackOfFit | undefined;
  const pe = pureError(frame, yShifted);
  const lofDf = residualDf - pe.df;
  if (pe.df > 0 && lofDf > 0) {
    const lofSs = Math.max(0, rss - pe.ss);
    const msPe = pe.ss / pe.df;
    const msLof = lofSs / lofDf;
    const f = ratio(msLof, msPe);
    const pv = f === null ? null : upperP(f, lofDf, pe.df);
    anova.push({ source: 'Lack of fit', df: lofDf, ss: lofSs, ms: msLof, f, p: pv });
    anova.push({ source: 'Pure error', df: pe.df, ss: pe.ss, ms: msPe, f: null, p: null });
    if (f !== null && pv !== null) {
      lackOfFit = { lackOfFitDf: lofDf, lackOfFitSs: lofSs, pureErrorDf: pe.df, pureErrorSs: pe.ss, f, p: pv, groups: pe.groups };
    }
  }
  anova.push({ source: 'Total', df: totalDf, ss: totalSs, ms: null, f: null, p: null });

  const rSquared = totalSs > 0 ? 1 - rss / totalSs : NaN;
  const adjustedRSquared = hasError && totalDf > 0 ? 1 - ((1 - rSquared) * totalDf) / residualDf : NaN;
  return {
    frame,
    fit,
    coefficients,
    aliased,
    anova,
    rSquared,
    adjustedRSquared,
    residualStdError: hasError ? Math.sqrt(mse) : null,
    residualDf,
    meanSquaredError: mse,
    lackOfFit,
    totalSs,
  };
}
