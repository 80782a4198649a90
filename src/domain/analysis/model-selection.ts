/**
 * Model choice: a Box–Cox power transform suggestion for a positive response, and backward
 * elimination of terms that keeps the model hierarchical (a term stays while a higher-order term
 * containing it stays).
 */
// Box & Cox (1964), J. R. Stat. Soc. B 26:211-252
import { DomainError, invalidInput } from '../errors';
import { parseTerm, type ModelTerm } from '../factors';
import { analyze } from './analyze';
import { chisqQuantile } from './distributions';
import { leastSquares } from './least-squares';
import { buildModelFrame } from './model-frame';
import type { AnalysisRequest, AnalysisResult } from './types';

export interface BoxCoxResult {
  /** λ maximising the profile log-likelihood (grid search refined by golden section). */
  lambda: number;
  /** 95% likelihood interval for λ. */
  interval: [number, number];
  /** A convenient power inside the interval: 1 (none) if possible, else the nearest of −2, −1, −0.5, 0 (log), 0.5, 2. */
  suggested: number;
  /** Human-readable name of the suggested transform. */
  transform: string;
  /** Profile log-likelihood over the grid, for plotting. */
  profile: { lambda: number; logLikelihood: number }[];
}

const NAMES: Record<string, string> = { '-2': '1/y²', '-1': '1/y', '-0.5': '1/√y', '0': 'log y', '0.5': '√y', '1': 'none', '2': 'y²' };

/** Box–Cox profile log-likelihood of λ for the request's model: −(n/2) log(RSS(λ)/n) with the geometric-mean-scaled transform. */
export function boxCox(request: AnalysisRequest, options: { low?: number; high?: number; step?: number } = {}): BoxCoxResult {
  const frame = buildModelFrame(request);
  const { n, p, x, y } = frame;
  for (let i = 0; i < n; i++) if (!(y[i]! > 0)) throw invalidInput('response', `a Box–Cox transform needs a positive response; row ${frame.rowIndex[i]} has ${y[i]}`);
  let logSum = 0;
  for (let i = 0; i < n; i++) logSum += Math.log(y[i]!);
  const logGm = logSum / n;
  const gm = Math.exp(logGm);
  const yl = new Float64Array(n);
  const ll = (lambda: number): number => {
    for (let i = 0; i < n; i++) {
      const ly = Math.log(y[i]!);
      yl[i] = Math.abs(lambda) < 1e-12 ? gm * ly : Math.expm1(lambda * ly) / (lambda * Math.pow(gm, lambda - 1));
    }
    const fit = leastSquares(x, yl, n, p, { refinementSteps: 0, refineCovariance: false });
    return -(n / 2) * Math.log(fit.residualSumOfSquares / n);
  };
  const low = options.low ?? -2;
  const high = options.high ?? 2;
  const step = options.step ?? 0.1;
  const profile: { lambda: number; logLikelihood: number }[] = [];
  for (let k = 0; low + k * step <= high + 1e-12; k++) {
    const lambda = Math.round((low + k * step) * 1e10) / 1e10;
    profile.push({ lambda, logLikelihood: ll(lambda) });
  }
  let best = 0;
  profile.forEach((pt, i) => { if (pt.logLikelihood > profile[best]!.logLikelihood) best = i; });
  // Golden-section refinement around the best grid point.
  let a = profile[Math.max(0, best - 1)]!.lambda;
  let b = profile[Math.min(profile.length - 1, best + 1)]!.lambda;
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = ll(c);
  let fd = ll(d);
  for (let it = 0; it < 60 && b - a > 1e-7; it++) {
    if (fc > fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = ll(c); }
    else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = ll(d); }
  }
  const lambda = (a + b) / 2;
  const lmax = ll(lambda);
  const cut = lmax - chisqQuantile(0.95, 1) / 2;
  // Interval ends by bisection on each side.
  const edge = (inside: number, outside: number) => {
    if (ll(outside) >= cut) return outside;
    for (let it = 0; it < 60; it++) {
      const mid = (inside + outside) / 2;
      if (ll(mid) >= cut) inside = mid;
      else outside = mid;
    }
    return (inside + outside) / 2;
  };
  const interval: [number, number] = [edge(lambda, Math.min(low, lambda - 1)), edge(lambda, Math.max(high, lambda + 1))];
  const candidates = [1, 0, 0.5, -0.5, -1, 2, -2];
  const inside = candidates.filter((v) => v >= interval[0] && v <= interval[1]);
  const suggested = inside.includes(1) ? 1 : (inside.length ? inside : candidates).reduce((u, v) => (Math.abs(v - lambda) < Math.abs(u - lambda) ? v : u));
  return { lambda, interval, suggested, transform: NAMES[String(suggested)]!, profile };
}

export interface ReductionStep {
  removed: string;
  p: number;
}

export interface BackwardReductionResult {
  /** Terms kept, in the original order. */
  terms: string[];
  steps: ReductionStep[];
  result: AnalysisResult;
}

/** Does term `inner` divide term `outer` (every factor of inner appears in outer with at least its power)? */
function contains(outer: ModelTerm, inner: ModelTerm): boolean {
  if (outer.label === inner.label) return false;
  return inner.parts.every((ip) => outer.parts.some((op) => op.name === ip.name && op.power >= ip.power));
}

/**
 * Backward elimination: repeatedly drop the term with the largest partial-F p-value above
 * `alpha` among the terms that no remaining term contains (hierarchy), refitting each time.
 */
export function backwardReduction(request: AnalysisRequest, options: { alpha?: number; keep?: string[] } = {}): BackwardReductionResult {
  if ((request.family ?? 'gaussian') !== 'gaussian') throw new DomainError('unsupported', 'backward reduction is available for least-squares analyses', 'family');
  const alpha = options.alpha ?? 0.05;
  const keep = new Set((options.keep ?? []).map((t) => parseTerm(t, request.factors).label));
  let terms = request.terms.map((t) => parseTerm(t, request.factors)).filter((t) => t.parts.length > 0);
  const steps: ReductionStep[] = [];
  let result = analyze({ ...request, terms: terms.map((t) => t.label), diagnostics: false });
  for (;;) {
    if (result.residualDf <= 0) break;
    const removable = terms.filter((t) => !keep.has(t.label) && !terms.some((o) => contains(o, t)));
    let worst: { term: ModelTerm; p: number } | undefined;
    for (const t of removable) {
      const row = result.anova.find((r) => r.source === t.label);
      const pv = row?.p ?? null;
      if (pv === null) continue;
      if (!worst || pv > worst.p) worst = { term: t, p: pv };
    }
    if (!worst || worst.p <= alpha || terms.length === 1) break;
    terms = terms.filter((t) => t.label !== worst!.term.label);
    steps.push({ removed: worst.term.label, p: worst.p });
    result = analyze({ ...request, terms: terms.map((t) => t.label), diagnostics: false });
  }
  const final = analyze({ ...request, terms: terms.map((t) => t.label) });
  return { terms: terms.map((t) => t.label), steps, result: final };
}
