/**
 * The "improve" acquisition over a fixed candidate set, as a state that a batch grows: plain (log) expected
 * improvement over the best posterior mean for (nearly) noiseless data, noisy expected improvement for
 * noisy data; batches either condition on the chosen trials (kriging believer for plain EI, joint fantasies
 * for noisy EI) or penalise around them (local penalisation). All values are in standardised goal units.
 */
import { expectedImprovement, logExpectedImprovement } from './acquisition';
import type { GaussianProcessModel } from './gaussian-process';
import { NoisyImprovement } from './noisy-improvement';
import { LocalPenalty } from './penalisation';
import { BelieverPosterior, CandidateVariances, meanStandardised } from './posterior';

export interface ImprovementState {
  /** log acquisition of pool candidate c, given the trials added so far. */
  logScore(c: number): number;
  /** log acquisition at any coded point. */
  logScoreAt(x: ArrayLike<number>): number;
  /** Expected improvement (standardised goal units) at x, and its log, as used for the batch so far. */
  improvementAt(x: ArrayLike<number>): { value: number; log: number };
  /** Add a chosen trial. */
  add(x: Float64Array): void;
  /** A new state from this one's start; call it on a state nothing was added to. */
  fresh(): ImprovementState;
}

/** Plain expected improvement over the best posterior mean at the observed settings; kriging-believer batches. */
export class PlugInImprovement implements ImprovementState {
  private readonly posterior: BelieverPosterior;
  private readonly variances: CandidateVariances;
  private readonly goalMean: Float64Array;
  private incumbent: number;

  constructor(
    private readonly model: GaussianProcessModel,
    private readonly sign: number,
    private readonly pool: readonly Float64Array[],
    private readonly extra: number,
    incumbent: number,
    base?: PlugInImprovement,
  ) {
    this.posterior = new BelieverPosterior(model, extra);
    this.variances = new CandidateVariances(this.posterior, pool, extra, base?.variances);
    this.goalMean = base ? base.goalMean : Float64Array.from(pool, (c) => sign * meanStandardised(model, c));
    this.incumbent = incumbent;
  }

  logScore(c: number): number {
    return logExpectedImprovement(this.goalMean[c]!, Math.sqrt(this.variances.variance[c]!), this.incumbent);
  }

  private goalAt(x: ArrayLike<number>): { mean: number; sd: number } {
    return { mean: this.sign * meanStandardised(this.model, x), sd: Math.sqrt(this.posterior.variance(x)) };
  }

  logScoreAt(x: ArrayLike<number>): number {
    const g = this.goalAt(x);
    return logExpectedImprovement(g.mean, g.sd, this.incumbent);
  }

  improvementAt(x: ArrayLike<number>): { value: number; log: number } {
    const g = this.goalAt(x);
    return { value: expectedImprovement(g.mean, g.sd, this.incumbent), log: logExpectedImprovement(g.mean, g.sd, this.incumbent) };
  }

  add(x: Float64Array): void {
    const added = this.posterior.add(x);
    this.variances.update(x, added);
    this.incumbent = Math.max(this.incumbent, this.sign * meanStandardised(this.model, x));
  }

  fresh(): ImprovementState {
    return new PlugInImprovement(this.model, this.sign, this.pool, this.extra, this.incumbent, this);
  }
}

/** Noisy expected improvement; batch trials join the joint fantasies. */
export class NoisyImprovementState implements ImprovementState {
  constructor(private readonly nei: NoisyImprovement) {}

  logScore(c: number): number {
    return this.nei.logScore(c);
  }

  logScoreAt(x: ArrayLike<number>): number {
    return this.nei.logScoreAt(x);
  }

  improvementAt(x: ArrayLike<number>): { value: number; log: number } {
    const r = this.nei.improvementAt(x);
    return { value: r.value, log: r.log };
  }

  add(x: Float64Array): void {
    this.nei.add(x);
  }

  fresh(): ImprovementState {
    return new NoisyImprovementState(this.nei.clone());
  }
}

/** Any of the above, held at its start, times local penalties around the chosen trials. */
export class PenalisedImprovement implements ImprovementState {
  constructor(
    private readonly inner: ImprovementState,
    private readonly penalty: LocalPenalty,
  ) {}

  logScore(c: number): number {
    return this.inner.logScore(c) + this.penalty.logPenalty(c);
  }

  logScoreAt(x: ArrayLike<number>): number {
    return this.inner.logScoreAt(x) + this.penalty.logPenaltyAt(x);
  }

  improvementAt(x: ArrayLike<number>): { value: number; log: number } {
    return this.inner.improvementAt(x);
  }

  add(x: Float64Array): void {
    this.penalty.add(x);
  }

  fresh(): ImprovementState {
    const p = this.penalty;
    return new PenalisedImprovement(this.inner, new LocalPenalty(p.model, p.sign, p.pool, p.best, p.lipschitz));
  }
}
