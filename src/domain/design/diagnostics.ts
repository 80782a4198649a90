/** Diagnostics shown beside every design: rank check and efficiencies of the model matrix. */
// Atkinson, Donev & Tobias (2007), Optimum Experimental Designs, with SAS, ch. 10-11 (D- and A-efficiency)
import { DomainError, invalidInput } from '../errors';
import { compileModel, modelMatrix, type DisallowedCombination, type Factor, type LinearConstraint, type ModelTerm } from '../factors';
import { seededRandom, randomInt } from '../random';
import { cholesky, dependentColumns, informationMatrix, inverseFromCholesky, logDetFromCholesky, quadraticForm } from './linear-algebra';
import { fTestPower } from './power';
import { candidateSet } from './prediction-variance';
import { codedRegion, momentMatrix } from './region';
import type { DesignDiagnostics, PowerSettings, TermPower } from './types';

export interface DiagnosticsOptions {
  constraints?: LinearConstraint[];
  disallowed?: DisallowedCombination[];
  power?: PowerSettings;
  /** Seed of the region samples (fraction-of-design-space curve, constrained moments). */
  seed?: number;
  /** Points sampled for the fraction-of-design-space curve (default 1000). */
  samples?: number;
}

/** Fractions at which the fraction-of-design-space curve is reported. */
export const FDS_FRACTIONS = Array.from({ length: 21 }, (_, i) => i / 20);

/**
 * Throws DomainError 'singular_design' naming the terms that cannot be estimated (their columns
 * are linear combinations of earlier columns, or there are fewer runs than parameters).
 */
export function assertEstimable(x: Float64Array, n: number, labels: readonly string[], termOfColumn: readonly number[], terms: readonly ModelTerm[]): void {
  const p = labels.length;
  const dependent = dependentColumns(x, n, p);
  if (dependent.length === 0) return;
  const inestimable = [...new Set(dependent.map((j) => terms[termOfColumn[j]!]!.label))];
  const why = n < p ? ` (${n} runs for ${p} parameters)` : '';
  throw new DomainError(
    'singular_design',
    `the design cannot estimate ${inestimable.join(', ')}${why}; add runs, more levels, or drop those terms from the model`,
    'model',
    { inestimable, columns: dependent.map((j) => labels[j]!) },
  );
}

export function designDiagnostics(
  factors: readonly Factor[],
  terms: readonly ModelTerm[],
  codedRuns: readonly ArrayLike<number>[],
  notes: string[] = [],
  options: DiagnosticsOptions = {},
): DesignDiagnostics {
  const model = compileModel(factors, terms);
  const { data, n, p } = modelMatrix(model, codedRuns);
  assertEstimable(data, n, model.labels, model.termOfColumn, terms);
  const xtx = informationMatrix(data, n, p);
  const l = cholesky(xtx, p);
  if (!l) {
    throw new DomainError('singular_design', 'the information matrix of this design is numerically singular; add runs or drop terms', 'model');
  }
  const logDet = logDetFromCholesky(l, p);
  const inv = inverseFromCholesky(l, p);
  let trace = 0;
  for (let i = 0; i < p; i++) trace += inv[i * p + i]!;

  const region = codedRegion({ factors: factors as Factor[], constraints: options.constraints, disallowed: options.disallowed });
  const seed = options.seed ?? 1;
  const w = momentMatrix(region, terms, seededRandom(seed + 104729));
  let traceW = 0;
  let traceWinv = 0;
  for (let i = 0; i < p; i++) traceW += w[i * p + i]!;
  for (let i = 0; i < p * p; i++) traceWinv += w[i]! * inv[i]!;

  // Largest scaled prediction variance over a candidate set of the region (design points included).
  const row = new Float64Array(p);
  let maxSpv = 0;
  const rng = seededRandom(seed + 15485863);
  for (const c of [...candidateSet(factors, 2000, rng), ...codedRuns.map((r) => Array.from(r))]) {
    if (!region.feasible(c)) continue;
    maxSpv = Math.max(maxSpv, n * quadraticForm(inv, model.row(c, row), p));
  }

  const vif = varianceInflation(data, n, p, model.labels);
  const correlation = columnCorrelations(data, n, p, model.labels);
  const fds = fractionOfDesignSpace(factors, region, model, inv, n, options.samples ?? 1000, seed);
  const errorDf = n - p;
  const power = options.power ? termPower(model.labels, model.termOfColumn, terms, inv, errorDf, options.power) : undefined;
  if (errorDf === 0) notes.push('no degrees of freedom are left for error: the model is saturated, so its terms cannot be tested');
  return {
    runs: n,
    parameters: p,
    rank: p,
    columns: model.labels,
    dEfficiency: Math.exp(logDet / p) / n,
    aEfficiency: p / (n * trace),
    iEfficiency: traceW / (n * traceWinv),
    gEfficiency: maxSpv > 0 ? p / maxSpv : NaN,
    averagePredictionVariance: n * traceWinv,
    maxPredictionVariance: maxSpv,
    maxVif: vif.length ? Math.max(...vif.map((v) => v.vif)) : 1,
    vif,
    correlation,
    fractionOfDesignSpace: fds,
    ...(power ? { power } : {}),
    errorDegreesOfFreedom: errorDf,
    notes,
  };
}

/** VIF of each non-intercept column: the diagonal of the inverse correlation matrix of the columns. */
// Marquardt (1970), Technometrics 12:591-612 (variance inflation factors)
export function varianceInflation(x: Float64Array, n: number, p: number, labels: readonly string[]): { column: string; vif: number }[] {
  const cols = labels.map((_, j) => j).filter((j) => labels[j] !== '(Intercept)');
  const q = cols.length;
  if (q === 0) return [];
  const r = correlationMatrix(x, n, p, cols);
  const l = cholesky(r, q);
  if (!l) return cols.map((j) => ({ column: labels[j]!, vif: Infinity }));
  const rinv = inverseFromCholesky(l, q);
  return cols.map((j, a) => ({ column: labels[j]!, vif: rinv[a * q + a]! }));
}

function correlationMatrix(x: Float64Array, n: number, p: number, cols: readonly number[]): Float64Array {
  const q = cols.length;
  const centred = cols.map((j) => {
    let mean = 0;
    for (let i = 0; i < n; i++) mean += x[i * p + j]!;
    mean /= n;
    const v = new Float64Array(n);
    let ss = 0;
    for (let i = 0; i < n; i++) {
      v[i] = x[i * p + j]! - mean;
      ss += v[i]! * v[i]!;
    }
    const s = ss > 0 ? 1 / Math.sqrt(ss) : 0;
    for (let i = 0; i < n; i++) v[i]! *= s;
    return v;
  });
  const r = new Float64Array(q * q);
  for (let a = 0; a < q; a++) {
    for (let b = a; b < q; b++) {
      let d = 0;
      for (let i = 0; i < n; i++) d += centred[a]![i]! * centred[b]![i]!;
      r[a * q + b] = d;
      r[b * q + a] = d;
    }
  }
  return r;
}

/** Correlations between model columns (intercept left out): the correlation map. */
export function columnCorrelations(x: Float64Array, n: number, p: number, labels: readonly string[]): { labels: string[]; values: number[][] } {
  const cols = labels.map((_, j) => j).filter((j) => labels[j] !== '(Intercept)');
  const q = cols.length;
  const r = correlationMatrix(x, n, p, cols);
  return {
    labels: cols.map((j) => labels[j]!),
    values: Array.from({ length: q }, (_, a) => Array.from({ length: q }, (_, b) => r[a * q + b]!)),
  };
}

/**
 * Fraction-of-design-space curve: scaled prediction variance n f(x)'(X'X)^-1 f(x) at seeded random
 * points of the region, as quantiles at fractions 0, 0.05, ..., 1.
 */
// Zahran, Anderson-Cook & Myers (2003), J. Quality Technology 35:377-386 (fraction of design space plots)
export function fractionOfDesignSpace(
  factors: readonly Factor[],
  region: ReturnType<typeof codedRegion>,
  model: ReturnType<typeof compileModel>,
  inv: Float64Array,
  n: number,
  samples: number,
  seed: number,
): { fraction: number[]; scaledPredictionVariance: number[] } {
  const rng = seededRandom(seed + 32452843);
  const p = model.p;
  const row = new Float64Array(p);
  const values: number[] = [];
  const levelCount = factors.map((f) => (f.kind === 'categorical' ? f.levels.length : f.kind === 'discrete' ? f.values.length : 0));
  const discreteCoded = factors.map((f) => (f.kind === 'discrete' ? f.values.map((v) => (2 * (v - Math.min(...f.values))) / (Math.max(...f.values) - Math.min(...f.values)) - 1) : []));
  for (let t = 0; t < samples * 20 && values.length < samples; t++) {
    const x = factors.map((f, j) =>
      f.kind === 'continuous' ? -1 + 2 * rng.next() : f.kind === 'discrete' ? discreteCoded[j]![randomInt(rng, levelCount[j]!)]! : randomInt(rng, levelCount[j]!),
    );
    if (!region.feasible(x)) continue;
    values.push(n * quadraticForm(inv, model.row(x, row), p));
  }
  values.sort((a, b) => a - b);
  const at = (f: number) => (values.length ? values[Math.min(values.length - 1, Math.round(f * (values.length - 1)))]! : NaN);
  return { fraction: FDS_FRACTIONS.slice(), scaledPredictionVariance: FDS_FRACTIONS.map(at) };
}

/**
 * Power of each term's F test. The effect size is the change in the response from a factor's low to
 * its high setting (so each coefficient of the term is effectSize / 2 in coded units), in units of σ.
 */
export function termPower(
  labels: readonly string[],
  termOfColumn: readonly number[],
  terms: readonly ModelTerm[],
  inv: Float64Array,
  errorDf: number,
  settings: PowerSettings,
): TermPower[] {
  const p = labels.length;
  const sigma = settings.sigma ?? 1;
  const alpha = settings.alpha ?? 0.05;
  const effect = settings.effectSize ?? 2 * sigma;
  if (!(sigma > 0)) throw invalidInput('power.sigma', 'sigma must be a positive number');
  if (!(alpha > 0 && alpha < 1)) throw invalidInput('power.alpha', 'alpha must be between 0 and 1');
  if (!(effect > 0)) throw invalidInput('power.effectSize', 'effectSize must be a positive number');
  const coef = effect / 2 / sigma;
  const out: TermPower[] = [];
  terms.forEach((t, ti) => {
    if (t.parts.length === 0) return;
    const cols = termOfColumn.map((x, j) => (x === ti ? j : -1)).filter((j) => j >= 0);
    const q = cols.length;
    // λ = β' C^-1 β with C the term's block of (X'X)^-1 and every coefficient of the term equal.
    const c = new Float64Array(q * q);
    cols.forEach((a, u) => cols.forEach((b, v) => (c[u * q + v] = inv[a * p + b]!)));
    const l = cholesky(c, q);
    const lambda = l ? coef * coef * quadraticForm(inverseFromCholesky(l, q), new Array<number>(q).fill(1), q) : 0;
    out.push({ term: t.label, numeratorDf: q, denominatorDf: errorDf, noncentrality: lambda, power: fTestPower(q, errorDf, lambda, alpha) });
  });
  return out;
}
