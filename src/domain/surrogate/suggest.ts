/**
 * Next trials: fit the surrogate to the campaign's data and pick a batch by the requested strategy.
 * "improve" maximises (log) expected improvement over the best posterior mean at the observed points
 * (the plug-in form for noisy data) and fills a batch by the kriging believer: each chosen point is
 * added as if it returned its predicted mean, which leaves the mean unchanged and shrinks the variance
 * nearby, so the next pick goes elsewhere.
 */
// Ginsbourger, Le Riche & Carraro (2010), Computational Intelligence in Expensive Optimization Problems, 131-162 (kriging believer)
import { DomainError, invalidInput, isDomainError } from '../errors';
import { codePoint, validateSpace, type Factor, type FactorSpace, type Point } from '../factors';
import { seededRandom, type RandomSource } from '../random';
import { expectedImprovement, logExpectedImprovement } from './acquisition';
import { feasibleCoded, latinHypercubeCandidates, perturbations, snapCoded } from './candidates';
import { crossCovariance, fitGaussianProcess, pointCovariance, type GaussianProcessModel } from './gaussian-process';
import { KERNEL_KINDS } from './kernels';
import { solveLower } from './linear-algebra';
import type { Suggestion, SuggestionRequest, SuggestionResult, SurrogateSummary } from './types';

const STRATEGIES = ['improve', 'explore', 'refine', 'confirm'] as const;
const MAX_COUNT = 100;

export interface PreparedData {
  space: FactorSpace;
  /** Coded inputs of trials with a response (failed trials excluded). */
  inputs: Float64Array[];
  y: number[];
  /** Coded inputs of every trial, with its failed flag. */
  all: { coded: Float64Array; failed: boolean }[];
}

function reField(e: unknown, prefix: string): unknown {
  if (isDomainError(e)) return new DomainError(e.code, e.message, e.field ? `${prefix}.${e.field}` : prefix, e.details);
  return e;
}

/** Validate the request and code its data rows. */
export function prepareData(request: SuggestionRequest): PreparedData {
  const space: FactorSpace = { factors: request.factors, constraints: request.constraints, disallowed: request.disallowed };
  validateSpace(space);
  if (!request.response || typeof request.response !== 'string') throw invalidInput('response', 'name the response column to optimise');
  if (request.goal !== 'maximize' && request.goal !== 'minimize') throw invalidInput('goal', 'goal must be "maximize" or "minimize"');
  if (!Number.isInteger(request.count) || request.count < 1 || request.count > MAX_COUNT) {
    throw invalidInput('count', `count must be a whole number from 1 to ${MAX_COUNT}`);
  }
  if (request.strategy !== undefined && !STRATEGIES.includes(request.strategy)) {
    throw invalidInput('strategy', `strategy must be one of: ${STRATEGIES.join(', ')}`);
  }
  if (request.kernel !== undefined && !KERNEL_KINDS.includes(request.kernel)) {
    throw invalidInput('kernel', `kernel must be one of: ${KERNEL_KINDS.join(', ')}`);
  }
  if (!Array.isArray(request.data)) throw invalidInput('data', 'data must be a list of observed trials');
  const inputs: Float64Array[] = [];
  const y: number[] = [];
  const all: PreparedData['all'] = [];
  request.data.forEach((row, i) => {
    let coded: Float64Array;
    try {
      coded = Float64Array.from(codePoint(request.factors, row as Point));
    } catch (e) {
      throw reField(e, `data[${i}]`);
    }
    const failed = row.failed === true;
    all.push({ coded, failed });
    if (failed) return;
    const raw = row[request.response];
    const value = typeof raw === 'number' ? raw : typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : NaN;
    if (!Number.isFinite(value)) {
      throw invalidInput(`data[${i}].${request.response}`, `trial ${i + 1} has no numeric ${request.response}; give the measured value or mark the trial failed`);
    }
    inputs.push(coded);
    y.push(value);
  });
  if (inputs.length < 2) {
    throw invalidInput('data', 'at least two trials with a measured response are needed to fit a surrogate; run a starting design first');
  }
  return { space, inputs, y, all };
}

export function summarise(model: GaussianProcessModel, factors: readonly Factor[]): SurrogateSummary {
  const lengthScales: Record<string, number> = {};
  factors.forEach((f, k) => {
    lengthScales[f.name] = model.lengthScales[k]!;
  });
  return {
    kernel: model.kernel,
    lengthScales,
    noiseVariance: model.noiseVariance,
    signalVariance: model.signalVariance,
    logMarginalLikelihood: model.logMarginalLikelihood,
    observations: model.n,
  };
}

/** Short human formatting of a number (3 significant digits). */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(2);
  return String(Number(v.toPrecision(3)));
}

/**
 * The posterior with extra "believed" points appended: a growing Cholesky factor in standardised units.
 * The mean is that of the fitted model throughout (a believed point equals its predicted mean).
 */
class BelieverPosterior {
  readonly model: GaussianProcessModel;
  private l: Float64Array;
  private size: number;
  private readonly capacity: number;
  readonly points: Float64Array[];
  readonly sf2: number;
  readonly nugget: number;

  constructor(model: GaussianProcessModel, extra: number) {
    this.model = model;
    this.size = model.n;
    this.capacity = model.n + extra;
    this.l = new Float64Array(this.capacity * this.capacity);
    for (let i = 0; i < model.n; i++) {
      for (let j = 0; j <= i; j++) this.l[i * this.capacity + j] = model.cholesky[i * model.n + j]!;
    }
    this.points = model.inputs.slice();
    this.sf2 = Math.exp(model.theta[model.d]!);
    this.nugget = Math.exp(model.theta[model.d + 1]!) + 1e-10;
  }

  get n(): number {
    return this.size;
  }

  /** v = L⁻¹ k(X, x) over the current (observed + believed) points. */
  whiten(point: ArrayLike<number>): Float64Array {
    const n = this.size;
    const cap = this.capacity;
    const k = new Float64Array(n);
    crossCovariance(this.model, point, k.subarray(0, this.model.n));
    for (let i = this.model.n; i < n; i++) k[i] = pointCovariance(this.model, this.points[i]!, point);
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const row = i * cap;
      let s = k[i]!;
      for (let j = 0; j < i; j++) s -= this.l[row + j]! * v[j]!;
      v[i] = s / this.l[row + i]!;
    }
    return v;
  }

  /** Standardised posterior variance of the latent function at a point. */
  variance(point: ArrayLike<number>): number {
    const v = this.whiten(point);
    let vv = 0;
    for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
    return Math.max(0, this.sf2 - vv);
  }

  /** Append a believed observation at `point`; returns its whitened row and diagonal for incremental updates. */
  add(point: Float64Array): { v: Float64Array; diagonal: number } {
    const v = this.whiten(point);
    let vv = 0;
    for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
    const diagonal = Math.sqrt(Math.max(this.sf2 + this.nugget - vv, 1e-12));
    const row = this.size * this.capacity;
    for (let j = 0; j < this.size; j++) this.l[row + j] = v[j]!;
    this.l[row + this.size] = diagonal;
    this.points.push(point);
    this.size++;
    return { v, diagonal };
  }
}

/** Standardised posterior mean of the fitted model at a point. */
function meanStandardised(model: GaussianProcessModel, point: ArrayLike<number>): number {
  const k = crossCovariance(model, point);
  let m = 0;
  for (let i = 0; i < model.n; i++) m += k[i]! * model.alpha[i]!;
  return m;
}

/** Standardised posterior means at the training inputs: K_f α = y − σ_n² α. */
function meansAtObservations(model: GaussianProcessModel): Float64Array {
  const nugget = Math.exp(model.theta[model.d + 1]!) + 1e-10;
  const out = new Float64Array(model.n);
  for (let i = 0; i < model.n; i++) out[i] = model.yStandardised[i]! - nugget * model.alpha[i]!;
  return out;
}

interface CandidatePool {
  coded: Float64Array[];
  points: Point[];
}

function buildCandidates(space: FactorSpace, model: GaussianProcessModel, sign: number, rng: RandomSource): CandidatePool {
  const factors = space.factors;
  const d = factors.length;
  const spread = Math.min(3000, Math.max(500, 150 * d));
  const raw = latinHypercubeCandidates(factors, spread, rng);
  // Local candidates around the observed points with the best posterior means.
  const means = meansAtObservations(model);
  const order = Array.from(means.keys()).sort((a, b) => sign * (means[b]! - means[a]!));
  for (const i of order.slice(0, 5)) {
    raw.push(...perturbations(factors, model.inputs[i]!, 40, 0.15, rng));
    raw.push(...perturbations(factors, model.inputs[i]!, 20, 0.04, rng));
  }
  const coded: Float64Array[] = [];
  const points: Point[] = [];
  for (const c of raw) {
    const p = feasibleCoded(space, c);
    if (p) {
      coded.push(c);
      points.push(p);
    }
  }
  if (coded.length === 0) {
    throw new DomainError('infeasible', 'no point of the factor space satisfies the constraints; loosen a constraint or a disallowed combination', 'constraints');
  }
  return { coded, points };
}

/** Compass search over the continuous coordinates, keeping feasibility; maximises `score`. */
export function refineLocally(
  space: FactorSpace,
  start: Float64Array,
  startScore: number,
  score: (coded: Float64Array) => number,
  maxEvaluations = 80,
): { coded: Float64Array; score: number } {
  const continuous = space.factors.map((f, k) => (f.kind === 'continuous' ? k : -1)).filter((k) => k >= 0);
  let best = start;
  let bestScore = startScore;
  let step = 0.1;
  let evaluations = 0;
  while (step >= 0.005 && evaluations < maxEvaluations && continuous.length > 0) {
    let improved = false;
    for (const k of continuous) {
      for (const dir of [1, -1]) {
        if (evaluations >= maxEvaluations) break;
        const trial = Float64Array.from(best);
        trial[k] = Math.min(1, Math.max(-1, trial[k]! + dir * step));
        if (trial[k] === best[k]) continue;
        const snapped = snapCoded(space.factors, trial);
        if (!feasibleCoded(space, snapped)) continue;
        evaluations++;
        const s = score(snapped);
        if (s > bestScore) {
          best = snapped;
          bestScore = s;
          improved = true;
        }
      }
    }
    if (!improved) step /= 2;
  }
  return { coded: best, score: bestScore };
}

/** Smallest coded separation between two points of one batch (a deliberate replicate is the "confirm" strategy's job). */
const BATCH_SEPARATION = 0.02;

/** True when `point` is (almost) the same trial as one already chosen: equal levels and numeric values within the separation. */
export function tooClose(point: ArrayLike<number>, chosen: readonly ArrayLike<number>[]): boolean {
  outer: for (const q of chosen) {
    for (let k = 0; k < q.length; k++) if (Math.abs(q[k]! - point[k]!) >= BATCH_SEPARATION) continue outer;
    return true;
  }
  return false;
}

function improveBatch(request: SuggestionRequest, data: PreparedData, model: GaussianProcessModel, rng: RandomSource): Suggestion[] {
  const sign = request.goal === 'maximize' ? 1 : -1;
  const { space } = data;
  const pool = buildCandidates(space, model, sign, rng);
  const posterior = new BelieverPosterior(model, request.count);
  const observedMeans = meansAtObservations(model);
  let incumbent = -Infinity;
  for (let i = 0; i < model.n; i++) incumbent = Math.max(incumbent, sign * observedMeans[i]!);

  const m = pool.coded.length;
  const goalMean = new Float64Array(m);
  const variance = new Float64Array(m);
  const whitened: Float64Array[] = [];
  for (let c = 0; c < m; c++) {
    goalMean[c] = sign * meanStandardised(model, pool.coded[c]!);
    const v = posterior.whiten(pool.coded[c]!);
    let vv = 0;
    for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
    variance[c] = Math.max(0, posterior.sf2 - vv);
    const grown = new Float64Array(model.n + request.count);
    grown.set(v);
    whitened.push(grown);
  }

  const suggestions: Suggestion[] = [];
  const chosenCoded: Float64Array[] = [];
  const bestObservedNatural = model.yMean + model.yScale * sign * incumbent;
  for (let b = 0; b < request.count; b++) {
    const best = incumbent;
    const scoreOf = (g: number, v: number) => logExpectedImprovement(g, Math.sqrt(v), best);
    const scores = new Float64Array(m);
    for (let c = 0; c < m; c++) scores[c] = tooClose(pool.coded[c]!, chosenCoded) ? -Infinity : scoreOf(goalMean[c]!, variance[c]!);
    const ranked = Array.from(scores.keys()).sort((a, c) => scores[c]! - scores[a]!);
    let chosen = { coded: pool.coded[ranked[0]!]!, score: scores[ranked[0]!]! };
    for (const start of ranked.slice(0, 3)) {
      if (scores[start] === -Infinity) continue;
      const refined = refineLocally(space, pool.coded[start]!, scores[start]!, (x) =>
        tooClose(x, chosenCoded) ? -Infinity : scoreOf(sign * meanStandardised(model, x), posterior.variance(x)),
      );
      if (refined.score > chosen.score) chosen = refined;
    }
    chosenCoded.push(chosen.coded);
    const g = sign * meanStandardised(model, chosen.coded);
    const believedVariance = posterior.variance(chosen.coded);
    const ei = expectedImprovement(g, Math.sqrt(believedVariance), best) * model.yScale;
    const prior = predictStandardised(model, chosen.coded);
    const mean = model.yMean + model.yScale * prior.mean;
    const sd = model.yScale * Math.sqrt(prior.variance);
    const values = feasibleCoded(space, chosen.coded)!;
    const beats = g > best;
    const reason = beats
      ? `Predicted ${request.response} ${formatNumber(mean)} ± ${formatNumber(sd)} beats the best so far (${formatNumber(bestObservedNatural)}); expected improvement ${formatNumber(ei)}.`
      : `Uncertain region (± ${formatNumber(sd)}) that may beat the best ${request.response} so far (${formatNumber(bestObservedNatural)}); expected improvement ${formatNumber(ei)}.`;
    suggestions.push({ values, mean, sd, acquisition: ei, reason });

    // Kriging believer: condition on the chosen point at its predicted mean.
    const added = posterior.add(chosen.coded);
    const column = posterior.n - 1;
    for (let c = 0; c < m; c++) {
      const w = whitened[c]!;
      let dot = 0;
      for (let i = 0; i < column; i++) dot += w[i]! * added.v[i]!;
      const kc = pointCovariance(model, pool.coded[c]!, chosen.coded);
      const u = (kc - dot) / added.diagonal;
      w[column] = u;
      variance[c] = Math.max(0, variance[c]! - u * u);
    }
    incumbent = Math.max(incumbent, g);
  }
  return suggestions;
}

/** Standardised posterior mean and variance of the fitted model (no believed points). */
function predictStandardised(model: GaussianProcessModel, point: ArrayLike<number>): { mean: number; variance: number } {
  const k = crossCovariance(model, point);
  let mean = 0;
  for (let i = 0; i < model.n; i++) mean += k[i]! * model.alpha[i]!;
  const v = solveLower(model.cholesky, model.n, k);
  let vv = 0;
  for (let i = 0; i < model.n; i++) vv += v[i]! * v[i]!;
  return { mean, variance: Math.max(0, Math.exp(model.theta[model.d]!) - vv) };
}

/** Fit the surrogate for a request (exported for the slice plots and the other strategies). */
export function fitSurrogate(request: SuggestionRequest, data: PreparedData = prepareData(request)): GaussianProcessModel {
  return fitGaussianProcess(data.inputs, data.y, {
    kernel: request.kernel ?? 'matern52',
    categorical: request.factors.map((f) => f.kind === 'categorical'),
    seed: request.seed ?? 1,
    starts: data.inputs.length > 300 ? 2 : 3,
  });
}

/** Suggest the next batch of trials for a campaign's data. */
export function suggestTrials(request: SuggestionRequest): SuggestionResult {
  const data = prepareData(request);
  const model = fitSurrogate(request, data);
  const rng = seededRandom((request.seed ?? 1) + 7919);
  const strategy = request.strategy ?? 'improve';
  let suggestions: Suggestion[];
  switch (strategy) {
    case 'improve':
      suggestions = improveBatch(request, data, model, rng);
      break;
    default:
      throw new DomainError('unsupported', `strategy "${strategy}" is not available yet; use "improve"`, 'strategy');
  }
  return { suggestions, model: summarise(model, request.factors) };
}
