/**
 * Regression diagnostics: leverage, internally and externally studentised residuals, Cook's
 * distance, PRESS and predicted R², and normal-probability-plot data of the residuals.
 */
// Cook (1977), Technometrics 19:15-18 (influence distance); Allen (1974), Technometrics 16:125-127 (PRESS)
import { normalQuantile } from './distributions';
import type { LinearModelFit } from './linear-model';

export interface NormalPlotPoint {
  /** Index of the run in the fitted order. */
  run: number;
  residual: number;
  /** Standard normal quantile of the residual's plotting position. */
  theoretical: number;
}

export interface Diagnostics {
  leverage: number[];
  /** Internally studentised residuals e_i / (s √(1 − h_i)); null where h_i = 1 or s is undefined. */
  standardizedResiduals: (number | null)[];
  /** Externally studentised residuals (s from the fit without run i). */
  studentizedResiduals: (number | null)[];
  cooksDistance: (number | null)[];
  /** Σ (e_i / (1 − h_i))²; null when some run has leverage 1. */
  press: number | null;
  predictedRSquared: number | null;
  /** Standardised residuals in ascending order against normal quantiles (Blom positions). */
  normalPlot: NormalPlotPoint[];
}

/** Leverage h_i = x_iᵀ (XᵀX)⁻¹ x_i over the estimable columns. */
export function leverages(lm: LinearModelFit): Float64Array {
  const { frame, fit } = lm;
  const { n } = frame;
  const r = fit.rank;
  const v = fit.unscaledCovariance;
  const h = new Float64Array(n);
  const xi = new Float64Array(r);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < r; k++) xi[k] = frame.x[fit.basis[k]! * n + i]!;
    let s = 0;
    for (let a = 0; a < r; a++) {
      let t = 0;
      const row = a * r;
      for (let b = 0; b < r; b++) t += v[row + b]! * xi[b]!;
      s += xi[a]! * t;
    }
    h[i] = Math.min(1, Math.max(0, s));
  }
  return h;
}

const ONE = 1 - 1e-10;

export function regressionDiagnostics(lm: LinearModelFit): Diagnostics {
  const { fit } = lm;
  const n = lm.frame.n;
  const p = fit.rank;
  const df = lm.residualDf;
  const mse = lm.meanSquaredError;
  const h = leverages(lm);
  const e = fit.residuals;
  const standardized: (number | null)[] = [];
  const studentized: (number | null)[] = [];
  const cooks: (number | null)[] = [];
  let press = 0;
  let pressDefined = true;
  for (let i = 0; i < n; i++) {
    const hi = h[i]!;
    const ei = e[i]!;
    if (hi >= ONE) {
      standardized.push(null);
      studentized.push(null);
      cooks.push(null);
      pressDefined = false;
      continue;
    }
    press += (ei / (1 - hi)) ** 2;
    if (!(df > 0) || !(mse > 0)) {
      standardized.push(null);
      studentized.push(null);
      cooks.push(null);
      continue;
    }
    const ri = ei / Math.sqrt(mse * (1 - hi));
    standardized.push(ri);
    cooks.push((ri * ri * hi) / (p * (1 - hi)));
    if (df > 1) {
      const s2i = (df * mse - (ei * ei) / (1 - hi)) / (df - 1);
      studentized.push(s2i > 0 ? ei / Math.sqrt(s2i * (1 - hi)) : null);
    } else {
      studentized.push(null);
    }
  }
  // Blom (1958) plotting positions (i − 3/8)/(n + 1/4)
  const order = Array.from({ length: n }, (_, i) => i)
    .filter((i) => standardized[i] !== null)
    .sort((a, b) => standardized[a]! - standardized[b]!);
  const m = order.length;
  const normalPlot = order.map((run, k) => ({ run, residual: standardized[run]!, theoretical: normalQuantile((k + 1 - 0.375) / (m + 0.25)) }));
  return {
    leverage: Array.from(h),
    standardizedResiduals: standardized,
    studentizedResiduals: studentized,
    cooksDistance: cooks,
    press: pressDefined ? press : null,
    predictedRSquared: pressDefined && lm.totalSs > 0 ? 1 - press / lm.totalSs : null,
    normalPlot,
  };
}
