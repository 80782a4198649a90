/**
 * Split-plot data: a linear mixed model with a random whole-plot intercept,
 *   y = Xβ + Zu + e,  u ~ N(0, σ²_wp I),  e ~ N(0, σ² I),
 * fitted by restricted maximum likelihood (REML), with Kenward–Roger adjusted covariance and
 * denominator degrees of freedom for each fixed term, so that whole-plot factors are tested against
 * whole-plot error and subplot factors against subplot error.
 */
// Patterson & Thompson (1971), Biometrika 58:545-554 (REML); Kenward & Roger (1997), Biometrics 53:983-997
import { EigenvalueDecomposition, Matrix, inverse } from 'ml-matrix';
import { invalidInput } from '../errors';
import { fUpperP, tQuantile } from './distributions';
import { buildModelFrame } from './model-frame';
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

export function splitPlotAnalysis(request: SplitPlotRequest): SplitPlotResult {
  const frame = buildModelFrame({ ...request, diagnostics: false });
  const { n } = frame;
  // Whole-plot membership of the rows used.
  const labels = frame.rowIndex.map((i) => {
    const v = request.data[i]![request.wholePlot];
    if (v === undefined || v === null || v === '') throw invalidInput(`data[${i}].${request.wholePlot}`, `row ${i} has no whole plot in column ${request.wholePlot}`);
    return String(v);
  });
  const plotIds = [...new Set(labels)];
  const plotOf = labels.map((l) => plotIds.indexOf(l));
  const g = plotIds.length;
  if (g < 2) throw invalidInput('wholePlot', 'a split-plot analysis needs at least two whole plots');
  // Estimable columns only (aliased ones dropped).
  const ols = leastSquares(frame.x, frame.y, n, frame.p, { refinementSteps: 0, refineCovariance: false });
  const cols = ols.basis;
  const p = cols.length;
  if (n - p < 1) throw invalidInput('terms', 'the model leaves no degrees of freedom for error');
  const X = new Matrix(n, p);
  for (let i = 0; i < n; i++) for (let k = 0; k < p; k++) X.set(i, k, frame.x[cols[k]! * n + i]!);
  const y = Matrix.columnVector(Array.from(frame.y));
  const Z = new Matrix(n, g);
  plotOf.forEach((w, i) => Z.set(i, w, 1));
  const ZZt = Z.mmul(Z.transpose());
  const I = Matrix.eye(n);

  // Profile REML log-likelihood in γ = σ²_wp / σ² (σ² profiled out).
  const profile = (gamma: number) => {
    const H = Matrix.add(I, Matrix.mul(ZZt, gamma));
    const Hi = inverse(H);
    const XtHi = X.transpose().mmul(Hi);
    const A = XtHi.mmul(X);
    const Ai = inverse(A);
    const beta = Ai.mmul(XtHi.mmul(y));
    const r = Matrix.sub(y, X.mmul(beta));
    const s2 = r.transpose().mmul(Hi).mmul(r).get(0, 0) / (n - p);
    const ll = -0.5 * ((n - p) * Math.log(s2) + logDetSpd(H) + logDetSpd(A) + (n - p) * (1 + Math.log(2 * Math.PI)));
    return { ll, s2, beta, Hi, Ai };
  };
  // Golden section on log γ, and the boundary γ = 0.
  let a = Math.log(1e-8);
  let b = Math.log(1e6);
  const gr = (Math.sqrt(5) - 1) / 2;
  let c = b - gr * (b - a);
  let d = a + gr * (b - a);
  let fc = profile(Math.exp(c)).ll;
  let fd = profile(Math.exp(d)).ll;
  for (let it = 0; it < 100 && b - a > 1e-9; it++) {
    if (fc > fd) { b = d; d = c; fd = fc; c = b - gr * (b - a); fc = profile(Math.exp(c)).ll; }
    else { a = c; c = d; fc = fd; d = a + gr * (b - a); fd = profile(Math.exp(d)).ll; }
  }
  let gamma = Math.exp((a + b) / 2);
  let best = profile(gamma);
  const atZero = profile(0);
  if (atZero.ll >= best.ll) { gamma = 0; best = atZero; }
  const sigma2 = best.s2;
  const sigma2wp = gamma * sigma2;

  // Kenward–Roger: V = σ²_wp ZZᵀ + σ² I, with V_1 = ZZᵀ, V_2 = I.
  const Vi = Matrix.mul(best.Hi, 1 / sigma2);
  const Phi = inverse(X.transpose().mmul(Vi).mmul(X));
  const derivs = [ZZt, I];
  const ViX = Vi.mmul(X);
  const Pmat = Matrix.sub(Vi, ViX.mmul(Phi).mmul(ViX.transpose())); // REML projection
  const Pi = derivs.map((D) => Matrix.mul(ViX.transpose().mmul(D).mmul(ViX), -1));
  const Qij = derivs.map((Di) => derivs.map((Dj) => ViX.transpose().mmul(Di).mmul(Vi).mmul(Dj).mmul(ViX)));
  const info = new Matrix(2, 2);
  for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) info.set(i, j, 0.5 * trace(Pmat.mmul(derivs[i]!).mmul(Pmat).mmul(derivs[j]!)));
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
    const bL = L.transpose().mmul(best.beta);
    const Fraw = bL.transpose().mmul(inverse(L.transpose().mmul(PhiA).mmul(L))).mmul(bL).get(0, 0) / l;
    return { m, f: lambda * Fraw };
  };

  const model = frame.model;
  const coefficients = cols.map((col, k) => {
    const L = new Matrix(p, 1);
    L.set(k, 0, 1);
    const { m } = krTest(L);
    const est = best.beta.get(k, 0);
    const se = Math.sqrt(PhiA.get(k, k));
    const t = est / se;
    const tq = tQuantile(0.975, m);
    return {
      term: model.labels[col]!,
      modelTerm: model.terms[model.termOfColumn[col]!]!.label,
      estimate: est,
      stdError: se,
      statistic: t,
      p: fUpperP(t * t, 1, m),
      ci95: [est - tq * se, est + tq * se] as [number, number],
      df: m,
    };
  });
  const tests: SplitPlotTerm[] = [];
  model.terms.forEach((t, ti) => {
    if (t.parts.length === 0) return;
    const positions = cols.map((col, k) => (model.termOfColumn[col] === ti ? k : -1)).filter((k) => k >= 0);
    if (positions.length === 0) return;
    const L = new Matrix(p, positions.length);
    positions.forEach((k, j) => L.set(k, j, 1));
    const { m, f } = krTest(L);
    tests.push({ source: t.label, df: positions.length, denominatorDf: m, f, p: fUpperP(f, positions.length, m) });
  });
  return { n, wholePlots: g, wholePlotVariance: sigma2wp, residualVariance: sigma2, coefficients, tests, restrictedLogLikelihood: best.ll };
}
