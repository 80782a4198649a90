/**
 * Next trials: fit the surrogate to the campaign's data and pick a batch by the requested strategy.
 *
 * - improve: (log) expected improvement over the best posterior mean at the observed settings (the plug-in
 *   form for noisy data), times the probability that the trial does not fail; batches by the kriging believer.
 * - explore: integrated reduction of the posterior variance over the factor space.
 * - refine: D-optimal augmentation of the observed design for a quadratic model.
 * - confirm: replicates at the predicted best.
 * Swap-aware: a hard-to-change factor with a change cost keeps its current level unless changing buys more
 * expected improvement per minute of rig time; the batch is grouped by level. Observed settings are
 * candidates too, so a replicate is suggested (and said so) when it is worth more than a new point.
 */
import { DomainError, invalidInput, isDomainError } from '../errors';
import { desirability, type DesirabilityResponse } from '../analysis';
import { augmentDesign } from '../design';
import { codePoint, decodePoint, validateSpace, type Factor, type FactorSpace, type Point } from '../factors';
import { seededRandom, type RandomSource } from '../random';
import { feasibleCoded, latinHypercubeCandidates, perturbations, snapCoded } from './candidates';
import { feasibilityProbability, fitFeasibility, type FeasibilityModel } from './feasibility';
import { fitGaussianProcess, leaveOneOutResiduals, pointCovariance, type GaussianProcessModel } from './gaussian-process';
import { KERNEL_KINDS } from './kernels';
import { DesirabilityImprovement, DesirabilitySurrogates } from './desirability-surrogate';
import { NoisyImprovementState, PenalisedImprovement, PlugInImprovement, type ImprovementState } from './improvement';
import { NoisyImprovement, noiseIsNegligible, NOISY_IMPROVEMENT_SAMPLES } from './noisy-improvement';
import { LocalPenalty } from './penalisation';
import { BelieverPosterior, CandidateVariances, meanStandardised, meansAtObservations, noiseStandardised, predictStandardised } from './posterior';
import { refineDesignCandidates, sequentialPredictionVariances } from './refine';
import type { Suggestion, SuggestionRequest, SuggestionResult, SurrogateSummary } from './types';

const STRATEGIES = ['improve', 'explore', 'refine', 'confirm'] as const;
const BATCH_MODES = ['believer', 'penalised'] as const;
const MAX_COUNT = 100;
/** The fit costs O(n³) per likelihood evaluation: beyond this the request would take minutes. */
export const MAX_FITTED_TRIALS = 1000;
/** Default lowest acceptable probability that a suggested trial does not fail. */
export const DEFAULT_FEASIBILITY_THRESHOLD = 0.5;
/** Default rig minutes per trial, used to weigh a change cost against the trials of a batch (an assumption; state your own). */
export const DEFAULT_TRIAL_MINUTES = 10;
/** Smallest coded separation between two new trials of one batch; closer counts as the same setting. */
const BATCH_SEPARATION = 0.02;

export interface PreparedData {
  space: FactorSpace;
  /** Coded inputs of trials with a response (failed trials excluded). */
  inputs: Float64Array[];
  y: number[];
  /** Coded inputs of every trial, with its failed flag, in the order given. */
  all: { coded: Float64Array; failed: boolean; row: number }[];
}

function reField(e: unknown, prefix: string): unknown {
  if (isDomainError(e)) return new DomainError(e.code, e.message, e.field ? `${prefix}.${e.field}` : prefix, e.details);
  return e;
}

function toNumber(raw: unknown): number {
  return typeof raw === 'number' ? raw : typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : NaN;
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
  if (request.batch !== undefined && !BATCH_MODES.includes(request.batch)) {
    throw invalidInput('batch', `batch must be one of: ${BATCH_MODES.join(', ')}`);
  }
  const t = request.feasibilityThreshold;
  if (t !== undefined && !(t >= 0 && t < 1)) throw invalidInput('feasibilityThreshold', 'the feasibility threshold is a probability from 0 up to (not including) 1');
  if (request.trialMinutes !== undefined && !(request.trialMinutes > 0)) throw invalidInput('trialMinutes', 'minutes per trial must be positive');
  for (const [name, minutes] of Object.entries(request.swapCost ?? {})) {
    if (!request.factors.some((f) => f.name === name)) throw invalidInput(`swapCost.${name}`, `unknown factor "${name}" in swapCost`);
    if (!(Number.isFinite(minutes) && minutes >= 0)) throw invalidInput(`swapCost.${name}`, 'a change cost is a number of minutes, zero or more');
  }
  if (!Array.isArray(request.data)) throw invalidInput('data', 'data must be a list of observed trials');
  const responses = request.responses && request.responses.length > 0 ? request.responses : null;
  if (responses) {
    // Checks each response's goal and limits (throws naming the response).
    desirability(Object.fromEntries(responses.map((r) => [r.name, 0])), responses);
  }
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
    all.push({ coded, failed, row: i });
    if (failed) return;
    if (responses) {
      const values: Record<string, number> = {};
      for (const r of responses) {
        const v = toNumber(row[r.name]);
        if (!Number.isFinite(v)) throw invalidInput(`data[${i}].${r.name}`, `trial ${i + 1} has no numeric ${r.name}; give the measured value or mark the trial failed`);
        values[r.name] = v;
      }
      inputs.push(coded);
      y.push(desirability(values, responses).overall);
      return;
    }
    const raw = row[request.response];
    const value = typeof raw === 'number' ? raw : typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : NaN;
    if (!Number.isFinite(value)) {
      throw invalidInput(`data[${i}].${request.response}`, `trial ${i + 1} has no numeric ${request.response}; give the measured value or mark the trial failed`);
    }
    inputs.push(coded);
    y.push(value);
  });
  if (inputs.length > MAX_FITTED_TRIALS) {
    throw invalidInput('data', `at most ${MAX_FITTED_TRIALS} trials with a response can be modelled in one request (got ${inputs.length}); send the most relevant ones`);
  }
  if (inputs.length < 2) {
    throw invalidInput('data', 'at least two trials with a measured response are needed to fit a surrogate; run a starting design first');
  }
  return { space, inputs, y, all };
}

export function summarise(model: GaussianProcessModel, factors: readonly Factor[], trialNumbers?: readonly number[]): SurrogateSummary {
  const lengthScales: Record<string, number> = {};
  factors.forEach((f, k) => {
    lengthScales[f.name] = model.lengthScales[k]!;
  });
  const loo = leaveOneOutResiduals(model);
  const residuals = loo.residual.map((residual, i) => ({ trial: trialNumbers?.[i] ?? i + 1, residual, standardised: loo.standardised[i]! }));
  const rmse = Math.sqrt(loo.residual.reduce((s, r) => s + r * r, 0) / model.n);
  const withinTwoSd = loo.standardised.filter((z) => Math.abs(z) <= 2).length / model.n;
  return {
    leaveOneOut: { residuals, rmse, withinTwoSd },
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

/** True when `point` is (almost) the same setting as one in `others`: every coded coordinate within the separation. */
export function tooClose(point: ArrayLike<number>, others: readonly ArrayLike<number>[]): boolean {
  return others.some((q) => sameSetting(point, q));
}

function sameSetting(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  for (let k = 0; k < a.length; k++) if (Math.abs(a[k]! - b[k]!) >= BATCH_SEPARATION) return false;
  return true;
}

/** Compass search over the given coordinates, keeping `allowed`; maximises `score`. */
export function refineLocally(
  factors: readonly Factor[],
  movable: readonly number[],
  start: Float64Array,
  startScore: number,
  score: (coded: Float64Array) => number,
  allowed: (coded: Float64Array) => boolean,
  maxEvaluations = 80,
): { coded: Float64Array; score: number } {
  let best = start;
  let bestScore = startScore;
  let step = 0.1;
  let evaluations = 0;
  while (step >= 0.005 && evaluations < maxEvaluations && movable.length > 0) {
    let improved = false;
    for (const k of movable) {
      for (const dir of [1, -1]) {
        if (evaluations >= maxEvaluations) break;
        const trial = Float64Array.from(best);
        trial[k] = Math.min(1, Math.max(-1, trial[k]! + dir * step));
        if (trial[k] === best[k]) continue;
        const snapped = snapCoded(factors, trial);
        if (!allowed(snapped)) continue;
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

/** Everything a strategy needs: the fitted models, the candidate pool and the rules a trial must satisfy. */
interface Context {
  request: SuggestionRequest;
  data: PreparedData;
  model: GaussianProcessModel;
  feasibility: FeasibilityModel | null;
  threshold: number;
  sign: number;
  factors: Factor[];
  /** Candidates (coded, snapped, satisfying the constraints) and their probability of not failing. */
  pool: Float64Array[];
  poolFeasibility: Float64Array;
  /** Candidates a strategy may pick: feasibility at or above the threshold (or the safest, if none is). */
  eligible: Uint8Array;
  /** True when no candidate reached the threshold and the safest ones were kept instead. */
  relaxed: boolean;
  /** Index in `data.inputs` of the observed setting each candidate replicates, or −1. */
  replicateOf: Int32Array;
  /** 1-based trial number (in the request's data) of each observed input. */
  trialNumber: number[];
  rng: RandomSource;
  /** True when the estimated noise is not negligible: "improve" then uses noisy expected improvement. */
  noisy: boolean;
  /** How "improve" builds a batch. */
  batch: 'believer' | 'penalised';
  /** Several responses: one surrogate per response, combined through the overall desirability (then `model` is fitted to the observed overall desirability and only spreads candidates, explores and reports). */
  desirability: DesirabilitySurrogates | null;
}

function probabilityOk(ctx: Pick<Context, 'feasibility'>, coded: ArrayLike<number>): number {
  return ctx.feasibility ? feasibilityProbability(ctx.feasibility, coded) : 1;
}

function buildContext(request: SuggestionRequest, data: PreparedData, model: GaussianProcessModel, rng: RandomSource): Context {
  const factors = request.factors;
  const sign = request.goal === 'maximize' ? 1 : -1;
  const categorical = factors.map((f) => f.kind === 'categorical');
  const feasibility = fitFeasibility(data.all.map((a) => a.coded), data.all.map((a) => a.failed), categorical, model.kernel);
  const threshold = request.feasibilityThreshold ?? DEFAULT_FEASIBILITY_THRESHOLD;
  const d = factors.length;
  const raw = latinHypercubeCandidates(factors, Math.min(3000, Math.max(500, 150 * d)), rng);
  const means = meansAtObservations(model);
  const order = Array.from(means.keys()).sort((a, b) => sign * (means[b]! - means[a]!));
  for (const i of order.slice(0, 5)) {
    raw.push(...perturbations(factors, model.inputs[i]!, 40, 0.15, rng));
    raw.push(...perturbations(factors, model.inputs[i]!, 20, 0.04, rng));
  }
  // Settings held at the current level of a costly hard-to-change factor (continuous ones need explicit copies).
  const costly = hardToChangeIndices(request);
  if (costly.some((k) => factors[k]!.kind === 'continuous') && data.all.length > 0) {
    const current = data.all[data.all.length - 1]!.coded;
    const held = raw.slice(0, 500).map((c) => {
      const copy = Float64Array.from(c);
      for (const k of costly) copy[k] = current[k]!;
      return copy;
    });
    raw.push(...held);
  }
  const pool: Float64Array[] = [];
  const replicateOf: number[] = [];
  // Observed settings first (replicate candidates), once each.
  const seen: Float64Array[] = [];
  model.inputs.forEach((x, i) => {
    if (seen.some((s) => s.every((v, k) => v === x[k]))) return;
    seen.push(x);
    if (!feasibleCoded(data.space, x)) return;
    pool.push(x);
    replicateOf.push(i);
  });
  for (const c of raw) {
    if (feasibleCoded(data.space, c)) {
      pool.push(c);
      replicateOf.push(-1);
    }
  }
  if (pool.length === 0) {
    throw new DomainError('infeasible', 'no point of the factor space satisfies the constraints; loosen a constraint or a disallowed combination', 'constraints');
  }
  const poolFeasibility = new Float64Array(pool.length);
  for (let c = 0; c < pool.length; c++) poolFeasibility[c] = feasibility ? feasibilityProbability(feasibility, pool[c]!) : 1;
  const eligible = new Uint8Array(pool.length);
  let any = false;
  let maxP = 0;
  for (let c = 0; c < pool.length; c++) {
    maxP = Math.max(maxP, poolFeasibility[c]!);
    if (poolFeasibility[c]! >= threshold) {
      eligible[c] = 1;
      any = true;
    }
  }
  if (!any) for (let c = 0; c < pool.length; c++) eligible[c] = poolFeasibility[c]! >= maxP - 0.05 ? 1 : 0;
  const trialNumber = data.all.filter((a) => !a.failed).map((a) => a.row + 1);
  return {
    request, data, model, feasibility, threshold, sign, factors, pool, poolFeasibility, eligible, relaxed: !any,
    replicateOf: Int32Array.from(replicateOf), trialNumber, rng,
    noisy: !noiseIsNegligible(model), batch: request.batch ?? 'believer', desirability: null,
  };
}

/** Factor indices with a positive change cost. */
function hardToChangeIndices(request: SuggestionRequest): number[] {
  const cost = request.swapCost ?? {};
  return request.factors.map((f, k) => ((cost[f.name] ?? 0) > 0 ? k : -1)).filter((k) => k >= 0);
}

interface Chosen {
  coded: Float64Array;
  /** Acquisition value in response units (constrained EI for improve). */
  acquisition: number;
  feasibility: number;
  replicateOf: number;
  /** log of `acquisition`, finite where the acquisition underflows (improve only). */
  logAcquisition?: number;
  /** Expected improvement (response units) at the moment of choice, before the feasibility weight. */
  improvement?: number;
  /** Incumbent (response units) when chosen. */
  incumbent?: number;
}

/** The start of the "improve" acquisition for this context: plain or noisy EI, believer or penalised batches. */
function improvementBase(ctx: Context): ImprovementState {
  const { model, sign, pool, request } = ctx;
  const inner: ImprovementState = ctx.desirability
    ? new DesirabilityImprovement(ctx.desirability, pool, request.count)
    : ctx.noisy
    ? new NoisyImprovementState(new NoisyImprovement(model, sign, pool, request.count, seededRandom((request.seed ?? 1) + 31337)))
    : new PlugInImprovement(model, sign, pool, request.count, observedIncumbent(ctx));
  if (ctx.batch !== 'penalised') return inner;
  // M: the best value the model believes reachable (at least the best at the observed settings), so every ball has a radius ≥ 0.
  let reachable = observedIncumbent(ctx);
  for (const c of pool) reachable = Math.max(reachable, sign * meanStandardised(model, c));
  // (With several responses the penalty works on the surrogate of the observed overall desirability.)
  return new PenalisedImprovement(inner, new LocalPenalty(model, sign, pool, reachable));
}

/** The value "improve" and "confirm" maximise at a point: goal-signed standardised mean, or the expected overall desirability. */
function goalValue(ctx: Pick<Context, 'model' | 'sign' | 'desirability'>, x: ArrayLike<number>): number {
  return ctx.desirability ? ctx.desirability.at(x).mean : ctx.sign * meanStandardised(ctx.model, x);
}

/** Best goal-signed posterior mean at the observed settings (standardised units). */
function observedIncumbent(ctx: Pick<Context, 'model' | 'sign'>): number {
  const observed = meansAtObservations(ctx.model);
  let incumbent = -Infinity;
  for (let i = 0; i < ctx.model.n; i++) incumbent = Math.max(incumbent, ctx.sign * observed[i]!);
  return incumbent;
}

/** Greedy batch maximising log acquisition + log P(no failure) over the allowed candidates. */
function selectImprove(ctx: Context, count: number, allowed: Uint8Array, base: ImprovementState, fixed: readonly number[]): Chosen[] {
  const { model, sign, pool } = ctx;
  const state = base.fresh();
  const m = pool.length;
  const logP = new Float64Array(m);
  for (let c = 0; c < m; c++) logP[c] = ctx.feasibility ? Math.log(Math.max(ctx.poolFeasibility[c]!, 1e-300)) : 0;
  // The best so far as the reasons state it: the best posterior mean at the observed settings, raised by believed trials.
  let incumbent = ctx.desirability ? ctx.desirability.incumbent : observedIncumbent(ctx);
  const scale = ctx.desirability ? 1 : model.yScale;
  const movable = ctx.factors.map((f, k) => (f.kind === 'continuous' && !fixed.includes(k) ? k : -1)).filter((k) => k >= 0);
  const chosenList: Chosen[] = [];
  const chosenCoded: Float64Array[] = [];
  for (let b = 0; b < count; b++) {
    const best = incumbent;
    const scores = new Float64Array(m).fill(-Infinity);
    for (let c = 0; c < m; c++) {
      if (!allowed[c] || tooClose(pool[c]!, chosenCoded)) continue;
      scores[c] = state.logScore(c) + logP[c]!;
    }
    const ranked = Array.from(scores.keys()).filter((c) => scores[c]! > -Infinity).sort((a, c) => scores[c]! - scores[a]!);
    if (ranked.length === 0) break;
    let pick = { coded: pool[ranked[0]!]!, score: scores[ranked[0]!]!, replicateOf: ctx.replicateOf[ranked[0]!]! };
    for (const start of ranked.slice(0, 3)) {
      if (ctx.replicateOf[start]! >= 0) continue;
      const refined = refineLocally(
        ctx.factors,
        movable,
        pool[start]!,
        scores[start]!,
        (x) => state.logScoreAt(x) + (ctx.feasibility ? Math.log(Math.max(probabilityOk(ctx, x), 1e-300)) : 0),
        (x) => !tooClose(x, chosenCoded) && feasibleCoded(ctx.data.space, x) !== null && (ctx.relaxed || probabilityOk(ctx, x) >= ctx.threshold),
      );
      if (refined.score > pick.score) pick = { coded: refined.coded, score: refined.score, replicateOf: -1 };
    }
    // A new point that lands on an observed setting is a replicate of it.
    if (pick.replicateOf < 0) {
      const i = model.inputs.findIndex((x) => sameSetting(x, pick.coded));
      if (i >= 0 && feasibleCoded(ctx.data.space, model.inputs[i]!) && !tooClose(model.inputs[i]!, chosenCoded) && (ctx.relaxed || probabilityOk(ctx, model.inputs[i]!) >= ctx.threshold)) {
        pick = { ...pick, coded: model.inputs[i]!, replicateOf: i };
      }
    }
    const g = goalValue(ctx, pick.coded);
    const p = probabilityOk(ctx, pick.coded);
    const ei = state.improvementAt(pick.coded);
    const improvement = ei.value * scale;
    chosenList.push({
      coded: pick.coded,
      acquisition: improvement * p,
      logAcquisition: ei.log + Math.log(scale) + Math.log(Math.max(p, 1e-300)),
      feasibility: p,
      replicateOf: pick.replicateOf,
      improvement,
      incumbent: ctx.desirability ? best : model.yMean + model.yScale * sign * best,
    });
    chosenCoded.push(pick.coded);
    state.add(pick.coded);
    if (ctx.batch === 'believer') incumbent = Math.max(incumbent, g);
  }
  return chosenList;
}

function improvementName(ctx: Pick<Context, 'noisy' | 'desirability'>): string {
  if (ctx.desirability) return 'expected gain in overall desirability';
  return ctx.noisy ? 'expected improvement (averaged over the noise)' : 'expected improvement';
}

/** What "improve" used, for the model summary. */
function improvementSummary(ctx: Context): string {
  if (ctx.desirability) {
    return `expected improvement of the overall desirability, one surrogate per response (${ctx.desirability.samples} draws per response); batch by ${ctx.batch === 'penalised' ? 'local penalisation' : 'kriging believer on every response'}`;
  }
  const kind = ctx.noisy
    ? `noisy expected improvement (${NOISY_IMPROVEMENT_SAMPLES} joint draws of the noiseless values at the observed settings)`
    : 'log expected improvement over the best posterior mean';
  return `${kind}; batch by ${ctx.batch === 'penalised' ? 'local penalisation' : ctx.noisy ? 'conditioning on drawn values of the chosen trials' : 'kriging believer'}`;
}

function describeImprove(ctx: Context, chosen: Chosen, mean: number, sd: number): string {
  const { request, model } = ctx;
  const noiseSd = Math.sqrt(model.noiseVariance);
  const best = chosen.incumbent!;
  const beats = ctx.sign * (mean - best) > 0;
  let text: string;
  if (chosen.replicateOf >= 0) {
    const trial = ctx.trialNumber[chosen.replicateOf]!;
    text = noiseSd > sd
      ? `Replicate of trial ${trial}: noise (sd ${formatNumber(noiseSd)}) outweighs the model's uncertainty here (± ${formatNumber(sd)}), so a repeat is worth more than a new point; predicted ${formatNumber(mean)}.`
      : `Replicate of trial ${trial}: still the most promising setting (${formatNumber(mean)} ± ${formatNumber(sd)}); a repeat firms it up.`;
  } else if (beats) {
    text = `Predicted ${request.response} ${formatNumber(mean)} ± ${formatNumber(sd)} beats the best so far (${formatNumber(best)}); ${improvementName(ctx)} ${formatNumber(chosen.improvement!)}.`;
  } else {
    text = `Uncertain region (± ${formatNumber(sd)}) that may beat the best ${request.response} so far (${formatNumber(best)}); ${improvementName(ctx)} ${formatNumber(chosen.improvement!)}.`;
  }
  if (ctx.feasibility) {
    text += ctx.relaxed
      ? ` No setting reaches the ${Math.round(ctx.threshold * 100)} % no-failure threshold; this one is among the safest (${Math.round(chosen.feasibility * 100)} %).`
      : ` Chance of running without failure ${Math.round(chosen.feasibility * 100)} %.`;
  }
  return text;
}

function toSuggestion(ctx: Context, chosen: Chosen, reason: (mean: number, sd: number) => string): Suggestion {
  const { model } = ctx;
  let mean: number;
  let sd: number;
  if (ctx.desirability) {
    // Mean and sd of the overall desirability under the per-response surrogates.
    const d = ctx.desirability.at(chosen.coded);
    mean = d.mean;
    sd = d.sd;
  } else {
    const pr = predictStandardised(model, chosen.coded);
    mean = model.yMean + model.yScale * pr.mean;
    sd = model.yScale * Math.sqrt(pr.variance);
  }
  const values = feasibleCoded(ctx.data.space, chosen.coded)!;
  const s: Suggestion = { values, mean, sd, acquisition: chosen.acquisition, reason: reason(mean, sd) };
  if (ctx.feasibility) s.feasibility = chosen.feasibility;
  return s;
}

function settingKey(coded: ArrayLike<number>, indices: readonly number[]): string {
  return indices.map((k) => String(Math.round(coded[k]! * 1e6) / 1e6)).join('|');
}

function describeSetting(ctx: Context, coded: ArrayLike<number>, indices: readonly number[]): string {
  const point = feasibleCoded({ factors: ctx.factors }, coded) ?? {};
  return indices.map((k) => `${ctx.factors[k]!.name} ${formatValue(point[ctx.factors[k]!.name])}`).join(', ');
}

function formatValue(v: unknown): string {
  return typeof v === 'number' ? formatNumber(v) : String(v);
}

/** Minutes spent changing hard-to-change factors when running the settings in `order` from `current`. */
function changeMinutes(ctx: Context, current: ArrayLike<number>, order: readonly ArrayLike<number>[], indices: readonly number[]): number {
  const cost = ctx.request.swapCost ?? {};
  let minutes = 0;
  let at = current;
  for (const next of order) {
    for (const k of indices) if (Math.abs(next[k]! - at[k]!) > 1e-9) minutes += cost[ctx.factors[k]!.name] ?? 0;
    at = next;
  }
  return minutes;
}

/** Order a batch so that trials sharing the levels of hard-to-change factors run together, the current levels first. */
function groupByLevels(chosen: Chosen[], indices: readonly number[], current: ArrayLike<number> | null): Chosen[] {
  if (indices.length === 0) return chosen;
  const keys: string[] = [];
  const groups = new Map<string, Chosen[]>();
  const currentKey = current ? settingKey(current, indices) : null;
  if (currentKey !== null) {
    keys.push(currentKey);
    groups.set(currentKey, []);
  }
  for (const c of chosen) {
    const key = settingKey(c.coded, indices);
    if (!groups.has(key)) {
      groups.set(key, []);
      keys.push(key);
    }
    groups.get(key)!.push(c);
  }
  return keys.flatMap((k) => groups.get(k)!);
}

function improveStrategy(ctx: Context): Suggestion[] {
  const { request, factors } = ctx;
  const costly = hardToChangeIndices(request);
  const grouping = factors.map((f, k) => (f.hardToChange || costly.includes(k) ? k : -1)).filter((k) => k >= 0);
  const current = ctx.data.all.length > 0 ? ctx.data.all[ctx.data.all.length - 1]!.coded : null;
  const base = improvementBase(ctx);
  if (costly.length === 0 || current === null) {
    const chosen = groupByLevels(selectImprove(ctx, request.count, ctx.eligible, base, []), grouping, current);
    return chosen.map((c) => toSuggestion(ctx, c, (mean, sd) => describeImprove(ctx, c, mean, sd)));
  }
  // Swap-aware: compare plans by expected improvement per minute of rig time.
  const trialMinutes = request.trialMinutes ?? DEFAULT_TRIAL_MINUTES;
  const currentKey = settingKey(current, costly);
  const keyOf = Array.from(ctx.pool, (c) => settingKey(c, costly));
  const bestByKey = new Map<string, number>();
  ctx.pool.forEach((_, i) => {
    if (!ctx.eligible[i]) return;
    const s = base.logScore(i);
    bestByKey.set(keyOf[i]!, Math.max(bestByKey.get(keyOf[i]!) ?? -Infinity, s));
  });
  // Whole-batch moves to another level make sense for levels (categorical, discrete), not for continuous values.
  const levelled = costly.every((k) => factors[k]!.kind !== 'continuous');
  const alternatives = levelled ? [...bestByKey.entries()].filter(([k]) => k !== currentKey).sort((a, b) => b[1] - a[1]).slice(0, 4).map(([k]) => k) : [];
  interface Plan { kind: 'stay' | 'switch' | 'free'; chosen: Chosen[]; minutes: number; rate: number; logRate: number }
  const plans: Plan[] = [];
  const runPlan = (kind: Plan['kind'], allowed: Uint8Array, fixed: number[]) => {
    if (!allowed.some((v) => v === 1)) return;
    const chosen = groupByLevels(selectImprove(ctx, request.count, allowed, base, fixed), costly, current);
    if (chosen.length === 0) return;
    const gain = chosen.reduce((s, c) => s + c.acquisition, 0);
    // log Σ acquisition, stable where EI underflows.
    const logs = chosen.map((c) => c.logAcquisition ?? Math.log(c.acquisition));
    const top = Math.max(...logs);
    const logGain = top === -Infinity ? -Infinity : top + Math.log(logs.reduce((s, l) => s + Math.exp(l - top), 0));
    const minutes = chosen.length * trialMinutes + changeMinutes(ctx, current, chosen.map((c) => c.coded), costly);
    plans.push({ kind, chosen, minutes, rate: gain / minutes, logRate: logGain - Math.log(minutes) });
  };
  runPlan('stay', ctx.eligible.map((e, i) => (e && keyOf[i] === currentKey ? 1 : 0)), costly);
  for (const key of alternatives) runPlan('switch', ctx.eligible.map((e, i) => (e && keyOf[i] === key ? 1 : 0)), costly);
  runPlan('free', ctx.eligible, []);
  if (plans.length === 0) return [];
  // Plans that fill the batch come first; among them the most expected improvement per minute.
  const full = plans.filter((p) => p.chosen.length === request.count);
  const candidatesPlans = full.length > 0 ? full : plans;
  const stay = plans.find((p) => p.kind === 'stay');
  let best = candidatesPlans[0]!;
  for (const p of candidatesPlans) if (p.logRate > best.logRate + 1e-9 || (p.logRate >= best.logRate - 1e-9 && p.minutes < best.minutes)) best = p;
  const perHour = (r: number) => formatNumber(r * 60);
  const others = plans.filter((p) => p !== best);
  const bestOther = others.length ? others.reduce((a, b) => (b.rate > a.rate ? b : a)) : null;
  const names = costly.map((k) => factors[k]!.name).join(', ');
  return best.chosen.map((c) =>
    toSuggestion(ctx, c, (mean, sd) => {
      let text = describeImprove(ctx, c, mean, sd);
      const key = settingKey(c.coded, costly);
      if (best.kind === 'stay') {
        text += ` Keeps ${describeSetting(ctx, current, costly)}: changing ${names} would not pay for its minutes` +
          (bestOther ? ` (expected improvement per hour ${perHour(best.rate)} vs ${perHour(bestOther.rate)}).` : '.');
      } else if (key === currentKey) {
        text += ` Runs before changing ${names} (batch changes cost ${formatNumber(best.minutes - best.chosen.length * trialMinutes)} min in all).`;
      } else {
        text += ` Grouped on ${describeSetting(ctx, c.coded, costly)}; the change is worth its minutes (expected improvement per hour ${perHour(best.rate)}` +
          (stay ? ` vs ${perHour(stay.rate)} staying).` : ').');
      }
      return text;
    }),
  );
}

/** Integrated variance reduction: pick trials that most reduce the average posterior variance over the space. */
// Sacks, Welch, Mitchell & Wynn (1989), Statistical Science 4:409-435 (integrated mean squared error)
function exploreStrategy(ctx: Context): Suggestion[] {
  const { model, pool, request } = ctx;
  const count = request.count;
  const reference = latinHypercubeCandidates(ctx.factors, 256, ctx.rng).filter((c) => feasibleCoded(ctx.data.space, c) && probabilityOk(ctx, c) >= ctx.threshold);
  const refs = reference.length > 0 ? reference : pool.slice(0, 256);
  const posterior = new BelieverPosterior(model, count);
  const cv = new CandidateVariances(posterior, pool, count);
  const rv = new CandidateVariances(posterior, refs, count);
  const m = pool.length;
  const r = refs.length;
  const n = posterior.n;
  const cov = new Float64Array(r * m);
  for (let i = 0; i < r; i++) {
    const wr = rv.whitenedOf(i);
    for (let c = 0; c < m; c++) {
      const wc = cv.whitenedOf(c);
      let dot = 0;
      for (let k = 0; k < n; k++) dot += wr[k]! * wc[k]!;
      cov[i * m + c] = pointCovariance(model, refs[i]!, pool[c]!) - dot;
    }
  }
  const nugget = noiseStandardised(model);
  const chosen: Chosen[] = [];
  const chosenCoded: Float64Array[] = [];
  const startAverage = rv.variance.reduce((s, v) => s + v, 0) / r;
  for (let b = 0; b < count; b++) {
    let bestC = -1;
    let bestScore = -Infinity;
    for (let c = 0; c < m; c++) {
      if (!ctx.eligible[c] || tooClose(pool[c]!, chosenCoded)) continue;
      let s = 0;
      for (let i = 0; i < r; i++) s += cov[i * m + c]! ** 2;
      s /= r * (cv.variance[c]! + nugget);
      if (s > bestScore) {
        bestScore = s;
        bestC = c;
      }
    }
    if (bestC < 0) break;
    const point = pool[bestC]!;
    chosen.push({ coded: point, acquisition: bestScore * model.yScale * model.yScale, feasibility: ctx.poolFeasibility[bestC]!, replicateOf: ctx.replicateOf[bestC]! });
    chosenCoded.push(point);
    const added = posterior.add(point);
    const uc = cv.update(point, added);
    const ur = rv.update(point, added);
    for (let i = 0; i < r; i++) for (let c = 0; c < m; c++) cov[i * m + c] = cov[i * m + c]! - ur[i]! * uc[c]!;
  }
  return chosen.map((c) =>
    toSuggestion(ctx, c, (mean, sd) => {
      const share = startAverage > 0 ? (100 * c.acquisition) / (startAverage * model.yScale * model.yScale) : 0;
      let text = `Explores: cuts the average predictive variance over the factor space by ${formatNumber(share)} % (sd here ± ${formatNumber(sd)}, predicted ${formatNumber(mean)}).`;
      if (ctx.feasibility) text += ` Chance of running without failure ${Math.round(c.feasibility * 100)} %.`;
      return text;
    }),
  );
}

/** Replicates at the predicted best setting among the allowed candidates (refined locally). */
function confirmStrategy(ctx: Context): Suggestion[] {
  const { model, pool } = ctx;
  let bestC = -1;
  let bestScore = -Infinity;
  for (let c = 0; c < pool.length; c++) {
    if (!ctx.eligible[c]) continue;
    const s = goalValue(ctx, pool[c]!);
    if (s > bestScore) {
      bestScore = s;
      bestC = c;
    }
  }
  if (bestC < 0) return [];
  let point = pool[bestC]!;
  let replicateOf = ctx.replicateOf[bestC]!;
  if (replicateOf < 0) {
    const movable = ctx.factors.map((f, k) => (f.kind === 'continuous' ? k : -1)).filter((k) => k >= 0);
    point = refineLocally(ctx.factors, movable, point, bestScore, (x) => goalValue(ctx, x), (x) =>
      feasibleCoded(ctx.data.space, x) !== null && (ctx.relaxed || probabilityOk(ctx, x) >= ctx.threshold),
    ).coded;
    const i = model.inputs.findIndex((x) => sameSetting(x, point));
    if (i >= 0) {
      point = model.inputs[i]!;
      replicateOf = i;
    }
  }
  const p = probabilityOk(ctx, point);
  const count = ctx.request.count;
  const chosen: Chosen = { coded: point, acquisition: 0, feasibility: p, replicateOf };
  return Array.from({ length: count }, (_, j) => {
    const s = toSuggestion(ctx, chosen, (mean, sd) => {
      const where = replicateOf >= 0 ? `at the setting of trial ${ctx.trialNumber[replicateOf]!}` : 'at a setting not yet run';
      let text = `Confirmation ${j + 1} of ${count} at the predicted best (${formatNumber(mean)} ± ${formatNumber(sd)}), ${where}: replicates check that the optimum holds up.`;
      if (ctx.feasibility) text += ` Chance of running without failure ${Math.round(p * 100)} %.`;
      return text;
    });
    // The acquisition of a confirmation run is the predicted response it confirms.
    s.acquisition = s.mean;
    return s;
  });
}

/**
 * D-optimal augmentation of the trials run so far for a quadratic model, by the design engine's optimal
 * search (coordinate exchange); when a pick falls below the feasibility threshold, or the search cannot
 * run, a sequential D-optimal pick among the eligible candidates is used instead.
 */
function refineStrategy(ctx: Context): Suggestion[] {
  const { request, factors, data } = ctx;
  let coded: Float64Array[] | null = null;
  let method = 'optimal augmentation';
  try {
    const result = augmentDesign(
      {
        factors, method: 'optimal', runs: request.count, model: 'quadratic', criterion: 'D',
        constraints: request.constraints, disallowed: request.disallowed,
        existingRuns: data.inputs.map((x) => decodePoint(factors, Array.from(x))), seed: request.seed ?? 1,
      },
      { starts: 8 },
    );
    const fresh = result.runs.filter((r) => !r.existing).map((r) => Float64Array.from(r.coded));
    const ok = fresh.every((x) => feasibleCoded(data.space, x) && (ctx.relaxed || probabilityOk(ctx, x) >= ctx.threshold));
    if (fresh.length === request.count && ok) coded = fresh;
  } catch (e) {
    if (!isDomainError(e)) throw e;
  }
  if (coded === null) {
    method = 'sequential pick among settings that keep the failure risk acceptable';
    const allowed = ctx.pool.filter((_, c) => ctx.eligible[c] === 1);
    coded = refineDesignCandidates(factors, data.inputs, allowed, request.count).map((p) => p.coded);
  }
  const variances = sequentialPredictionVariances(factors, data.inputs, coded);
  return coded.map((x, i) => {
    const c = ctx.pool.findIndex((p, k) => ctx.replicateOf[k]! >= 0 && sameSetting(p, x));
    const chosen: Chosen = { coded: x, acquisition: variances[i]!, feasibility: probabilityOk(ctx, x), replicateOf: c >= 0 ? ctx.replicateOf[c]! : -1 };
    return toSuggestion(ctx, chosen, (mean, sd) => {
      let text = `Refines the quadratic model (D-optimal, ${method}): the design so far predicts poorly here (scaled prediction variance ${formatNumber(variances[i]!)}); predicted ${formatNumber(mean)} ± ${formatNumber(sd)}.`;
      if (ctx.feasibility) text += ` Chance of running without failure ${Math.round(chosen.feasibility * 100)} %.`;
      return text;
    });
  });
}

/** Fit the surrogate for a request (exported for the slice plots and the other strategies). */
export function fitSurrogate(request: SuggestionRequest, data: PreparedData = prepareData(request)): GaussianProcessModel {
  const model = fitGaussianProcess(data.inputs, data.y, {
    kernel: request.kernel ?? 'matern52',
    categorical: request.factors.map((f) => f.kind === 'categorical'),
    seed: request.seed ?? 1,
    starts: data.inputs.length > 100 ? 2 : 3,
  });
  model.factors = request.factors.slice();
  return model;
}

/** One surrogate per response (same trials, same options as the main fit), for the overall desirability. */
function fitResponseSurrogates(request: SuggestionRequest, data: PreparedData, responses: readonly DesirabilityResponse[]): DesirabilitySurrogates {
  const rows = data.all.filter((a) => !a.failed).map((a) => request.data[a.row]!);
  const surrogates = responses.map((response) => {
    const y = rows.map((row) => toNumber(row[response.name]));
    const model = fitGaussianProcess(data.inputs, y, {
      kernel: request.kernel ?? 'matern52',
      categorical: request.factors.map((f) => f.kind === 'categorical'),
      seed: request.seed ?? 1,
      starts: data.inputs.length > 100 ? 2 : 3,
    });
    model.factors = request.factors.slice();
    return { response, model };
  });
  return new DesirabilitySurrogates(surrogates, seededRandom((request.seed ?? 1) + 4099));
}

/** Suggest the next batch of trials for a campaign's data. */
export function suggestTrials(input: SuggestionRequest): SuggestionResult {
  const combined = input.responses && input.responses.length > 0;
  // Several responses: the overall desirability is the response, always maximised.
  const request: SuggestionRequest = combined ? { ...input, goal: 'maximize', response: input.response || 'desirability' } : input;
  const data = prepareData(request);
  const model = fitSurrogate(request, data);
  const ctx = buildContext(request, data, model, seededRandom((request.seed ?? 1) + 7919));
  if (combined) ctx.desirability = fitResponseSurrogates(request, data, input.responses!);
  const strategy = request.strategy ?? 'improve';
  const run = { improve: improveStrategy, explore: exploreStrategy, confirm: confirmStrategy, refine: refineStrategy }[strategy];
  const summary = summarise(model, request.factors, ctx.trialNumber);
  if (strategy === 'improve') summary.acquisition = improvementSummary(ctx);
  if (combined) {
    summary.desirabilityOf = input.responses!.map((r) => r.name);
    summary.responseModels = Object.fromEntries(ctx.desirability!.surrogates.map((s) => {
      const lengthScales: Record<string, number> = {};
      request.factors.forEach((f, k) => {
        lengthScales[f.name] = s.model.lengthScales[k]!;
      });
      return [s.response.name, { lengthScales, noiseVariance: s.model.noiseVariance, signalVariance: s.model.signalVariance, logMarginalLikelihood: s.model.logMarginalLikelihood }];
    }));
  }
  return { suggestions: run(ctx), model: summary };
}
