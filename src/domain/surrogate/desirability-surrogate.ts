/**
 * Several responses: one Gaussian-process surrogate per response, combined through the overall
 * desirability D (weighted geometric mean of individual desirabilities). At a setting, D is a function of
 * the responses' posteriors; its mean, sd and expected improvement over the best D at the observed
 * settings (D of the posterior means there) are averaged over a fixed set of stratified normal draws per
 * response, the same draws at every setting so that settings compare without sampling noise between them.
 * Batches condition each response's surrogate on the chosen trials (kriging believer).
 */
// Derringer & Suich (1980), Journal of Quality Technology 12:214-219 (desirability)
import { individualDesirability, type DesirabilityResponse } from '../analysis';
import type { RandomSource } from '../random';
import type { GaussianProcessModel } from './gaussian-process';
import type { ImprovementState } from './improvement';
import { stratifiedNormals } from './noisy-improvement';
import { BelieverPosterior, CandidateVariances, meanStandardised, meansAtObservations, predictStandardised } from './posterior';

/** Draws per response for the desirability averages (common practice, no source). */
export const DESIRABILITY_SAMPLES = 128;

export interface ResponseSurrogate {
  response: DesirabilityResponse;
  model: GaussianProcessModel;
}

/** Overall desirability of response values in the order of `responses`. */
function overall(values: ArrayLike<number>, responses: readonly DesirabilityResponse[]): number {
  let logSum = 0;
  let weights = 0;
  for (let r = 0; r < responses.length; r++) {
    const d = individualDesirability(values[r]!, responses[r]!);
    if (d <= 0) return 0;
    const w = responses[r]!.importance ?? 1;
    logSum += w * Math.log(d);
    weights += w;
  }
  return Math.exp(logSum / weights);
}

/** Per-response surrogates and the shared draws. */
export class DesirabilitySurrogates {
  readonly surrogates: readonly ResponseSurrogate[];
  readonly responses: DesirabilityResponse[];
  readonly samples: number;
  /** Draws z[r · samples + s]. */
  private readonly z: Float64Array;
  /** Best overall desirability of the posterior means at the observed settings. */
  readonly incumbent: number;

  constructor(surrogates: readonly ResponseSurrogate[], rng: RandomSource, samples = DESIRABILITY_SAMPLES) {
    this.surrogates = surrogates;
    this.responses = surrogates.map((s) => s.response);
    this.samples = samples;
    this.z = stratifiedNormals(surrogates.length, samples, rng);
    const k = surrogates.length;
    const means = surrogates.map((s) => meansAtObservations(s.model));
    const n = surrogates[0]!.model.n;
    let best = 0;
    const values = new Float64Array(k);
    for (let i = 0; i < n; i++) {
      for (let r = 0; r < k; r++) values[r] = surrogates[r]!.model.yMean + surrogates[r]!.model.yScale * means[r]![i]!;
      best = Math.max(best, overall(values, this.responses));
    }
    this.incumbent = best;
  }

  /** Mean and sd of D, and E[max(D − incumbent, 0)], from per-response means and sds (response units). */
  summarise(means: ArrayLike<number>, sds: ArrayLike<number>, incumbent = this.incumbent): { mean: number; sd: number; improvement: number } {
    const k = this.surrogates.length;
    const S = this.samples;
    const values = new Float64Array(k);
    let sum = 0;
    let sum2 = 0;
    let gain = 0;
    for (let s = 0; s < S; s++) {
      for (let r = 0; r < k; r++) values[r] = means[r]! + sds[r]! * this.z[r * S + s]!;
      const d = overall(values, this.responses);
      sum += d;
      sum2 += d * d;
      if (d > incumbent) gain += d - incumbent;
    }
    const mean = sum / S;
    return { mean, sd: Math.sqrt(Math.max(0, sum2 / S - mean * mean)), improvement: gain / S };
  }

  /** Posterior mean and latent sd of every response at a point (response units). */
  predict(x: ArrayLike<number>): { means: Float64Array; sds: Float64Array } {
    const k = this.surrogates.length;
    const means = new Float64Array(k);
    const sds = new Float64Array(k);
    this.surrogates.forEach((s, r) => {
      const p = predictStandardised(s.model, x);
      means[r] = s.model.yMean + s.model.yScale * p.mean;
      sds[r] = s.model.yScale * Math.sqrt(p.variance);
    });
    return { means, sds };
  }

  /** Mean and sd of the overall desirability at a point. */
  at(x: ArrayLike<number>): { mean: number; sd: number; improvement: number } {
    const p = this.predict(x);
    return this.summarise(p.means, p.sds);
  }
}

/** log of an improvement, with a finite stand-in where no draw improves, ordered by the mean D. */
function logGain(improvement: number, mean: number, incumbent: number): number {
  return improvement > 0 ? Math.log(improvement) : -700 + (mean - incumbent);
}

/** Expected improvement of the overall desirability over a candidate set; kriging-believer batches per response. */
export class DesirabilityImprovement implements ImprovementState {
  private readonly posteriors: BelieverPosterior[];
  private readonly variances: CandidateVariances[];
  private readonly means: Float64Array[];
  private incumbent: number;

  constructor(
    private readonly combined: DesirabilitySurrogates,
    private readonly pool: readonly Float64Array[],
    private readonly extra: number,
    base?: DesirabilityImprovement,
  ) {
    this.posteriors = combined.surrogates.map((s) => new BelieverPosterior(s.model, extra));
    this.variances = combined.surrogates.map((_, r) => new CandidateVariances(this.posteriors[r]!, pool, extra, base?.variances[r]));
    this.means = base ? base.means : combined.surrogates.map((s) => Float64Array.from(pool, (c) => s.model.yMean + s.model.yScale * meanStandardised(s.model, c)));
    this.incumbent = base ? base.incumbent : combined.incumbent;
  }

  private stateOf(c: number): { mean: number; improvement: number } {
    const k = this.means.length;
    const means = new Float64Array(k);
    const sds = new Float64Array(k);
    for (let r = 0; r < k; r++) {
      means[r] = this.means[r]![c]!;
      sds[r] = this.combined.surrogates[r]!.model.yScale * Math.sqrt(this.variances[r]!.variance[c]!);
    }
    return this.combined.summarise(means, sds, this.incumbent);
  }

  private stateAt(x: ArrayLike<number>): { mean: number; improvement: number } {
    const k = this.means.length;
    const means = new Float64Array(k);
    const sds = new Float64Array(k);
    this.combined.surrogates.forEach((s, r) => {
      means[r] = s.model.yMean + s.model.yScale * meanStandardised(s.model, x);
      sds[r] = s.model.yScale * Math.sqrt(this.posteriors[r]!.variance(x));
    });
    return this.combined.summarise(means, sds, this.incumbent);
  }

  logScore(c: number): number {
    const st = this.stateOf(c);
    return logGain(st.improvement, st.mean, this.incumbent);
  }

  logScoreAt(x: ArrayLike<number>): number {
    const st = this.stateAt(x);
    return logGain(st.improvement, st.mean, this.incumbent);
  }

  improvementAt(x: ArrayLike<number>): { value: number; log: number } {
    const st = this.stateAt(x);
    return { value: st.improvement, log: logGain(st.improvement, st.mean, this.incumbent) };
  }

  /** The best D so far as the batch believes it. */
  currentIncumbent(): number {
    return this.incumbent;
  }

  add(x: Float64Array): void {
    const st = this.stateAt(x);
    this.posteriors.forEach((p, r) => this.variances[r]!.update(x, p.add(x)));
    // Believer: the chosen trial is taken to return its expected desirability.
    this.incumbent = Math.max(this.incumbent, st.mean);
  }

  fresh(): ImprovementState {
    return new DesirabilityImprovement(this.combined, this.pool, this.extra, this);
  }
}
