/**
 * Split-plot data: a linear mixed model with a random whole-plot intercept,
 *   y = Xβ + Zu + e,  u ~ N(0, σ²_wp I),  e ~ N(0, σ² I),
 * fitted by restricted maximum likelihood (REML), with Kenward–Roger adjusted covariance and
 * denominator degrees of freedom for each fixed term, so that whole-plot factors are tested against
 * whole-plot error and subplot factors against subplot error.
 *
 * V is block diagonal (one block σ²I + σ²_wp J per whole plot), so every quantity is formed from
 * per-plot sums in O(n·p²): no n × n matrix is ever built.
 */
// Patterson & Thompson (1971), Biometrika 58:545-554 (REML); Kenward & Roger (1997), Biometrics 53:983-997
import { EigenvalueDecomposition, Matrix, inverse } from 'ml-matrix';
import { DomainError, invalidInput } from '../errors';
import { fUpperP, tQuantile } from './distributions';
import { buildModelFrame, type ModelFrame } from './model-frame';
import { leastSquares } from './least-squares';
import type { AnalysisRequest, CoefficientRow } from './types';

export interface SplitPlotRequest extends AnalysisRequest {
  /** Column that names each run's whole plot (e.g. the surface bed set up once for several runs). */
  wholePlot: string;
}

export interface SplitPlotTerm {
  source: string;
  /** Numerator df (columns of the term) and Kenward–Roger denominator df. */
  df: number;
  denominatorDf: number;
  /** Kenward–Roger scaled F statistic and its p-value. */
  f: number;
  p: number;
  /** "whole plot" when every column of the term is constant within each whole plot, else "subplot". */
  stratum: 'whole plot' | 'subplot';
}

export interface SplitPlotResult {
  n: number;
  wholePlots: number;
  /** REML variance components. */
  wholePlotVariance: number;
  residualVariance: number;
  coefficients: (CoefficientRow & { df: number })[];
  tests: SplitPlotTerm[];
  restrictedLogLikelihood: number;
  /** Residual df of the classical strata: whole plots less whole-plot parameters, and what the subplots leave. */
  wholePlotErrorDf: number;
  subplotErrorDf: number;
  /** Per whole plot: its label, run count and predicted random effect (BLUP). */
  wholePlotEffects: { label: string; runs: number; effect: number }[];
  /** Whole-plot label of each run used (fitted order). */
  wholePlotOf: string[];
  /** Fixed-effect fit Xβ̂ and residuals y − Xβ̂ (whole-plot deviation included), fitted order. */
  fitted: Float64Array;
  residuals: Float64Array;
  /** Kenward–Roger adjusted covariance of the estimates, coefficient order. */
  covariance: number[][];
  /** Model-matrix columns dropped as aliased. */
  aliased: string[];
  frame: ModelFrame;
}

/** The split-plot part of an analysis answer. */
export interface SplitPlotSummary {
  /** The request's whole-plot column. */
  wholePlot: string;
  wholePlots: number;
  /** Classical strata residual df (exact Kenward–Roger df in balanced designs). */
  wholePlotErrorDf: number;
  subplotErrorDf: number;
  restrictedLogLikelihood: number;
  wholePlotEffects: { label: string; runs: number; effect: number }[];
  /** Whole-plot label of each run used, in the order of fitted and residuals. */
  wholePlotOf: string[];
}

function logDetSpd(m: Matrix): number {
  const evd = new EigenvalueDecomposition(m, { assumeSymmetric: true });
  return evd.realEigenvalues.reduce((s, v) => s + Math.log(v), 0);
}

function trace(m: Matrix): number {
  let s = 0;
  for (let i = 0; i < m.rows; i++) s += m.get(i, i);
  return s;
}

/** Σ_w weight_w · v_w v_wᵀ for the rows v_w of `vectors` (g × p). */
function weightedOuter(vectors: Float64Array[], weights: ArrayLike<number>, p: number): Matrix {
  const out = new Matrix(p, p);
  vectors.forEach((v, w) => {
    const c = weights[w]!;
    if (c === 0) return;
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) out.set(a, b, out.get(a, b) + c * v[a]! * v[b]!);
  });
  return out;
}

export function splitPlotAnalysis(request: SplitPlotRequest): SplitPlotResult {
  try {
    return fitSplitPlot(request);
  } catch (e) {
    // A singular matrix left after the checks below means the whole plots and terms are confounded
    // in a way the df checks did not see: a 422 naming the whole plots, never a 500.
    if (e instanceof Error && !(e instanceof DomainError) && /singular/i.test(e.message)) {
      throw new DomainError('singular_design', `the split-plot fit is singular for the whole plots in column ${request.wholePlot} and these terms; add whole plots or runs, or drop terms`, 'wholePlot');
    }
    throw e;
  }
}

function fitSplitPlot(request: SplitPlotRequest): SplitPlotResult {
  const column = request.wholePlot;
  if (!request.data.some((r) => r !== null && typeof r === 'object' && r[column] !== undefined && r[column] !== null && r[column] !== '')) {
    throw invalidInput('wholePlot', `no run has a value in column "${column}"; name the column that identifies each run's whole plot`);
  }
  if (column === request.response) throw invalidInput('wholePlot', `"${column}" is the response; name the column that identifies each run's whole plot`);
  const frame = buildModelFrame({ ...request, diagnostics: false });
  const { n } = frame;
  // Whole-plot membership of the rows used.
  const labels = frame.rowIndex.map((i) => {
    const v = request.data[i]![column];
    if (v === undefined || v === null || v === '') throw invalidInput(`data[${i}].${column}`, `row ${i} has no whole plot in column ${column}; fill it in or leave the row out`);
    return String(v);
  });
  const plotIndex = new Map<string, number>();
  const plotOf = labels.map((l) => {
    let w = plotIndex.get(l);
    if (w === undefined) plotIndex.set(l, (w = plotIndex.size));
    return w;
  });
  const plotIds = [...plotIndex.keys()];
  const g = plotIds.length;
  if (g < 2) throw invalidInput('wholePlot', `a split-plot analysis needs at least two whole plots; column ${column} has one`);
  const sizes = new Float64Array(g);
  for (const w of plotOf) sizes[w]! += 1;

  // Estimable columns only (aliased ones dropped).
  const ols = leastSquares(frame.x, frame.y, n, frame.p, { refinementSteps: 0, refineCovariance: false });
  const cols = ols.basis;
  const p = cols.length;
  const model = frame.model;
  const xc = cols.map((c) => frame.x.subarray(c * n, (c + 1) * n));
  // Work with the response divided by its spread (restored at the end), so that very large or very
  // small responses neither overflow nor underflow.
  let yMean = 0;
  for (let i = 0; i < n; i++) yMean += frame.y[i]!;
  yMean /= n;
  let ySs = 0;
  let yMax = 0;
  for (let i = 0; i < n; i++) {
    ySs += (frame.y[i]! - yMean) ** 2;
    yMax = Math.max(yMax, Math.abs(frame.y[i]!));
  }
  const scale = ySs > 0 && Number.isFinite(ySs) ? Math.sqrt(ySs / n) : yMax > 0 && Number.isFinite(yMax) ? yMax : 1;
  const y = frame.y.map((v) => v / scale);

  // Columns constant within every whole plot are whole-plot columns; their rank in the g plot means
  // fixes the whole-plot error df, the rest is subplot error.
  const wholePlotColumn = xc.map((col) => {
    const first = new Float64Array(g).fill(NaN);
    for (let i = 0; i < n; i++) {
      const w = plotOf[i]!;
      if (Number.isNaN(first[w]!)) first[w] = col[i]!;
      else if (Math.abs(col[i]! - first[w]!) > 1e-12 * (1 + Math.abs(first[w]!))) return false;
    }
    return true;
  });
  const wpCols = xc.map((_, k) => k).filter((k) => wholePlotColumn[k]);
  let wpRank = 0;
  if (wpCols.length > 0) {
    const agg = new Float64Array(g * wpCols.length);
    wpCols.forEach((k, j) => {
      for (let i = 0; i < n; i++) agg[j * g + plotOf[i]!] = xc[k]![i]!;
    });
    wpRank = leastSquares(agg, new Float64Array(g), g, wpCols.length, { refinementSteps: 0, refineCovariance: false }).basis.length;
  }
  const wholePlotErrorDf = g - wpRank;
  const subplotErrorDf = n - p - wholePlotErrorDf;
  if (wholePlotErrorDf < 1) {
    throw invalidInput('wholePlot', `the ${g} whole plots in column ${column} leave no degrees of freedom for whole-plot error (${wpRank} whole-plot parameters); add whole plots or drop whole-plot terms`);
  }
  if (subplotErrorDf < 1) {
    throw invalidInput('wholePlot', `the runs leave no degrees of freedom for subplot error (${n} runs, ${p} parameters, ${g} whole plots in column ${column}); whole plots need several runs each`);
  }

  // Per-plot sums: s_w = Σ x_i, t_w = Σ y_i; and XᵀX, Xᵀy.
  const s = Array.from({ length: g }, () => new Float64Array(p));
  const t = new Float64Array(g);
  const XtX = new Matrix(p, p);
  const Xty = new Matrix(p, 1);
  for (let a = 0; a < p; a++) {
    const ca = xc[a]!;
    for (let i = 0; i < n; i++) s[plotOf[i]!]![a] += ca[i]!;
    let sy = 0;
    for (let i = 0; i < n; i++) sy += ca[i]! * y[i]!;
    Xty.set(a, 0, sy);
    for (let b = a; b < p; b++) {
      const cb = xc[b]!;
      let v = 0;
      for (let i = 0; i < n; i++) v += ca[i]! * cb[i]!;
      XtX.set(a, b, v);
      XtX.set(b, a, v);
    }
  }
  for (let i = 0; i < n; i++) t[plotOf[i]!] += y[i]!;
  const tVec = t;

  const residualsOf = (beta: Matrix) => {
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let e = y[i]!;
      for (let a = 0; a < p; a++) e -= xc[a]![i]! * beta.get(a, 0);
      r[i] = e;
    }
    return r;
  };
  const plotSums = (r: Float64Array) => {
    const out = new Float64Array(g);
    for (let i = 0; i < n; i++) out[plotOf[i]!] += r[i]!;
    return out;
  };

  // Profile REML log-likelihood in γ = σ²_wp / σ² (σ² profiled out), H = I + γZZᵀ,
  // H⁻¹ = I − c_w J within plot w, c_w = γ / (1 + γ n_w).
  const profile = (gamma: number) => {
    const c = Array.from(sizes, (nw) => gamma / (1 + gamma * nw));
    const A = Matrix.sub(XtX, weightedOuter(s, c, p));
    const b = Xty.clone();
    for (let w = 0; w < g; w++) for (let a = 0; a < p; a++) b.set(a, 0, b.get(a, 0) - c[w]! * s[w]![a]! * tVec[w]!);
    const Ai = inverse(A);
    const beta = Ai.mmul(b);
    const r = residualsOf(beta);
    const R = plotSums(r);
    let q = 0;
    for (let i = 0; i < n; i++) q += r[i]! * r[i]!;
    for (let w = 0; w < g; w++) q -= c[w]! * R[w]! * R[w]!;
    const s2 = q / (n - p);
    let logDetH = 0;
    for (let w = 0; w < g; w++) logDetH += Math.log(1 + gamma * sizes[w]!);
    const ll = -0.5 * ((n - p) * Math.log(s2) + logDetH + logDetSpd(A) + (n - p) * (1 + Math.log(2 * Math.PI)));
    // d ll / dγ: −½[−(n−p) Σ R_w²/(1+γn_w)² / q + Σ n_w/(1+γn_w) − Σ s_wᵀA⁻¹s_w/(1+γn_w)²]
    let d1 = 0;
    let d2 = 0;
    let d3 = 0;
    for (let w = 0; w < g; w++) {
      const f = 1 / (1 + gamma * sizes[w]!);
      d1 += R[w]! * R[w]! * f * f;
      d2 += sizes[w]! * f;
      const sw = Matrix.columnVector(Array.from(s[w]!));
      d3 += sw.transpose().mmul(Ai).mmul(sw).get(0, 0) * f * f;
    }
    const score = -0.5 * (-(n - p) * d1 / q + d2 - d3);
    return { ll, s2, beta, Ai, r, R, score };
  };

  // Golden section on log γ, then the score equation solved by bisection for full precision;
  // and the boundary γ = 0.
  let a = Math.log(1e-10);
  let b = Math.log(1e8);
  const gr = (Math.sqrt(5) - 1) / 2;
  let c = b - gr * (b - a);
  let d = a + gr * (b - a);
  let fc = profile(Math.exp(c)).ll;
  let fd = profile(Math.exp(d)).ll;
  for (let it = 0; it < 200 && b - a > 1e-3; it++) {
    if (fc > fd) { b = d; d = c; fd = fc; c = b - gr * (b - a); fc = profile(Math.exp(c)).ll; }
    else { a = c; c = d; fc = fd; d = a + gr * (b - a); fd = profile(Math.exp(d)).ll; }
  }
  let lo = a - 1e-3;
  let hi = b + 1e-3;
  let gamma = Math.exp((a + b) / 2);
  if (profile(Math.exp(lo)).score > 0 && profile(Math.exp(hi)).score < 0) {
    for (let it = 0; it < 100 && hi - lo > 1e-15 * Math.max(1, Math.abs(lo)); it++) {
      const mid = (lo + hi) / 2;
      if (profile(Math.exp(mid)).score > 0) lo = mid;
      else hi = mid;
    }
    gamma = Math.exp((lo + hi) / 2);
  }
  let best = profile(gamma);
  const atZero = profile(0);
  if (atZero.ll >= best.ll) { gamma = 0; best = atZero; }
  const sigma2 = best.s2;
  if (!(sigma2 > 1e-20)) {
    throw invalidInput('response', `${request.response} has no variation left around the model within the whole plots (an exact fit), so there is no error to test the terms against; check the response column or fit fewer terms`);
  }
  const sigma2wp = gamma * sigma2;

  // Kenward–Roger with V = σ²_wp ZZᵀ + σ² I, V_1 = ZZᵀ, V_2 = I, all from per-plot sums:
  // U = V⁻¹X, u_w = Σ_{i∈w} U_i = s_w / (σ²(1+γn_w)), d_w = 1ᵀV_w⁻¹1 = n_w / (σ²(1+γn_w)).
  const cw = Array.from(sizes, (nw) => gamma / (1 + gamma * nw));
  const fw = Array.from(sizes, (nw) => 1 / (1 + gamma * nw));
  const u = s.map((sv, w) => sv.map((v) => (v * fw[w]!) / sigma2));
  const dw = Array.from(sizes, (nw, w) => (nw * fw[w]!) / sigma2);
  // UᵀU = (XᵀH⁻²X)/σ⁴ with H⁻² = I − (2c_w − n_w c_w²) J within plot w.
  const UtU = Matrix.mul(Matrix.sub(XtX, weightedOuter(s, cw.map((cv, w) => 2 * cv - sizes[w]! * cv * cv), p)), 1 / (sigma2 * sigma2));
  const Phi = Matrix.mul(best.Ai, sigma2);
  const P1 = Matrix.mul(weightedOuter(u, new Float64Array(g).fill(1), p), -1);
  const P2 = Matrix.mul(UtU, -1);
  const Pi = [P1, P2];
  const Q11 = weightedOuter(u, dw, p);
  const Q12 = weightedOuter(u, fw.map((f) => f / sigma2), p);
  // UᵀV⁻¹U = (UᵀU − Σ c_w u_w u_wᵀ) / σ²
  const Q22 = Matrix.mul(Matrix.sub(UtU, weightedOuter(u, cw, p)), 1 / sigma2);
  const Qij = [[Q11, Q12], [Q12, Q22]];
  // tr(V⁻¹V_iV⁻¹V_j)
  let t11 = 0;
  let t12 = 0;
  let t22 = 0;
  for (let w = 0; w < g; w++) {
    t11 += dw[w]! * dw[w]!;
    t12 += (sizes[w]! * fw[w]! * fw[w]!) / (sigma2 * sigma2);
    t22 += (sizes[w]! - 1 + fw[w]! * fw[w]!) / (sigma2 * sigma2);
  }
  const tvv = [[t11, t12], [t12, t22]];
  // Expected REML information ½ tr(P V_i P V_j), P = V⁻¹ − UΦUᵀ.
  const info = new Matrix(2, 2);
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      const v = tvv[i]![j]! - trace(Phi.mmul(Qij[i]![j]!)) - trace(Phi.mmul(Qij[j]![i]!)) + trace(Phi.mmul(Pi[i]!).mmul(Phi).mmul(Pi[j]!));
      info.set(i, j, 0.5 * v);
    }
  }
  // At the boundary (σ²_wp = 0) the whole-plot component is fixed: only σ² varies.
  const W = gamma === 0 ? new Matrix([[0, 0], [0, 1 / info.get(1, 1)]]) : inverse(info);
  let adj = Matrix.zeros(p, p);
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      const term = Matrix.sub(Qij[i]![j]!, Pi[i]!.mmul(Phi).mmul(Pi[j]!));
      adj = Matrix.add(adj, Matrix.mul(term, W.get(i, j)));
    }
  }
  const PhiA = Matrix.add(Phi, Matrix.mul(Phi.mmul(adj).mmul(Phi), 2));

  const krTest = (L: Matrix) => {
    const l = L.columns;
    const LtPhiL = L.transpose().mmul(Phi).mmul(L);
    const Theta = L.mmul(inverse(LtPhiL)).mmul(L.transpose());
    const M = Pi.map((P) => Theta.mmul(Phi).mmul(P).mmul(Phi));
    let A1 = 0;
    let A2 = 0;
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        A1 += W.get(i, j) * trace(M[i]!) * trace(M[j]!);
        A2 += W.get(i, j) * trace(M[i]!.mmul(M[j]!));
      }
    }
    const bL = L.transpose().mmul(best.beta);
    const Fraw = bL.transpose().mmul(inverse(L.transpose().mmul(PhiA).mmul(L))).mmul(bL).get(0, 0) / l;
    if (A2 <= 1e-14 * Math.max(1, Math.abs(A1))) return { m: Infinity, f: Fraw }; // variance components without influence: normal reference
    // One numerator df: A1 = A2 and the formulas below reduce exactly to λ = 1, m = 2/A2; taken in that
    // form, since λ = m/(E(m − 2)) is 0·∞ when m is near 2 (two whole-plot error df).
    if (l === 1) return { m: 2 / A2, f: Fraw };
    const B = (A1 + 6 * A2) / (2 * l);
    const gg = ((l + 1) * A1 - (l + 4) * A2) / ((l + 2) * A2);
    const den = 3 * l + 2 * (1 - gg);
    const c1 = gg / den;
    const c2 = (l - gg) / den;
    const c3 = (l + 2 - gg) / den;
    const Estar = 1 / (1 - A2 / l);
    const Vstar = (2 / l) * ((1 + c1 * B) / ((1 - c2 * B) ** 2 * (1 - c3 * B)));
    const rho = Vstar / (2 * Estar * Estar);
    const m = 4 + (l + 2) / (l * rho - 1);
    const lambda = m / (Estar * (m - 2));
    // Near m = 2 the scale is unstable; λ = 1 is its value in balanced designs (exact F).
    return { m, f: (Number.isFinite(lambda) && lambda > 0 ? lambda : 1) * Fraw };
  };

  const coefficients = cols.map((col, k) => {
    const L = new Matrix(p, 1);
    L.set(k, 0, 1);
    const { m } = krTest(L);
    const est = best.beta.get(k, 0);
    const se = Math.sqrt(PhiA.get(k, k));
    const tv = est / se;
    const tq = tQuantile(0.975, m);
    return {
      term: model.labels[col]!,
      modelTerm: model.terms[model.termOfColumn[col]!]!.label,
      estimate: est * scale,
      stdError: se * scale,
      statistic: tv,
      p: fUpperP(tv * tv, 1, m),
      ci95: [(est - tq * se) * scale, (est + tq * se) * scale] as [number, number],
      df: m,
    };
  });
  const tests: SplitPlotTerm[] = [];
  model.terms.forEach((term, ti) => {
    if (term.parts.length === 0) return;
    const positions = cols.map((col, k) => (model.termOfColumn[col] === ti ? k : -1)).filter((k) => k >= 0);
    if (positions.length === 0) return;
    const L = new Matrix(p, positions.length);
    positions.forEach((k, j) => L.set(k, j, 1));
    const { m, f } = krTest(L);
    const stratum = positions.every((k) => wholePlotColumn[k]) ? 'whole plot' : 'subplot';
    tests.push({ source: term.label, df: positions.length, denominatorDf: m, f, p: fUpperP(f, positions.length, m), stratum });
  });
  const fitted = new Float64Array(n);
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    fitted[i] = (y[i]! - best.r[i]!) * scale;
    residuals[i] = best.r[i]! * scale;
  }
  const aliasedCols = new Set(cols);
  return {
    n,
    wholePlots: g,
    wholePlotVariance: sigma2wp * scale * scale,
    residualVariance: sigma2 * scale * scale,
    coefficients,
    tests,
    restrictedLogLikelihood: best.ll - (n - p) * Math.log(scale),
    wholePlotErrorDf,
    subplotErrorDf,
    // BLUP of each plot's effect: σ²_wp 1ᵀV_w⁻¹ r_w = c_w Σ r_i
    wholePlotEffects: plotIds.map((label, w) => ({ label, runs: sizes[w]!, effect: cw[w]! * best.R[w]! * scale })),
    wholePlotOf: labels,
    fitted,
    residuals,
    covariance: PhiA.to2DArray().map((row) => row.map((v) => v * scale * scale)),
    aliased: Array.from({ length: frame.p }, (_, j) => j).filter((j) => !aliasedCols.has(j)).map((j) => model.labels[j]!),
    frame,
  };
}
