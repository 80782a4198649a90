/**
 * Noisy expected improvement: with noisy observations the incumbent is itself uncertain, so expected
 * improvement is averaged over the posterior of the noiseless values f(X) at the observed settings. For
 * each of a fixed number of joint draws f_s(X) (stratified normal draws from the seed), the improvement
 * over max f_s(X) has a closed form under the noiseless conditional f(x) | f_s(X), which is also the
 * posterior conditional (y depends on f(x) only through f(X)); the acquisition is the average over draws.
 * Trials already chosen for the batch join the conditioning set with values drawn from that conditional,
 * so the batch is a joint fantasy rather than a plug-in.
 */
// Letham, Karrer, Ottoni & Bakshy (2019), Bayesian Analysis 14:495-519 (noisy expected improvement)
import normalQuantileImpl from '@stdlib/stats-base-dists-normal-quantile';
import { type RandomSource } from '../random';
import { expectedImprovement, logExpectedImprovementFactor } from './acquisition';
import { crossCovariance, pointCovariance, type GaussianProcessModel } from './gaussian-process';
import { choleskyInPlace, solveLower } from './linear-algebra';

/** Joint draws of the noiseless values per acquisition evaluation (common practice, no source). */
export const NOISY_IMPROVEMENT_SAMPLES = 128;
/**
 * Noise variance, as a share of the response variance, at or below which the noise counts as negligible
 * and plain (log) expected improvement is used: a noise sd under about 3 % of the response sd (common
 * practice, no source).
 */
export const NEGLIGIBLE_NOISE_SHARE = 1e-3;

/** True when the fitted noise variance is small enough for plain expected improvement. */
export function noiseIsNegligible(model: GaussianProcessModel): boolean {
  return Math.exp(model.theta[model.d + 1]!) <= NEGLIGIBLE_NOISE_SHARE;
}

/**
 * `rows` × `samples` standard normal deviates, stratified in every row: each row takes one value from each
 * of `samples` equal-probability strata, in a seeded random order (a Latin hypercube over the draws).
 */
export function stratifiedNormals(rows: number, samples: number, rng: RandomSource): Float64Array {
  const out = new Float64Array(rows * samples);
  const order = new Int32Array(samples);
  for (let r = 0; r < rows; r++) {
    for (let s = 0; s < samples; s++) order[s] = s;
    for (let s = samples - 1; s > 0; s--) {
      const t = Math.floor(rng.next() * (s + 1));
      const tmp = order[s]!;
      order[s] = order[t]!;
      order[t] = tmp;
    }
    for (let s = 0; s < samples; s++) {
      const u = (order[s]! + rng.next()) / samples;
      out[r * samples + s] = normalQuantileImpl(Math.min(1 - 1e-12, Math.max(1e-12, u)), 0, 1);
    }
  }
  return out;
}

/** Cholesky of a symmetric matrix with the smallest diagonal jitter (relative to `scale`) that succeeds. */
function choleskyWithJitter(a: Float64Array, n: number, scale: number): { l: Float64Array; jitter: number } {
  for (let jitter = 1e-10; jitter <= 1e-2; jitter *= 10) {
    const l = Float64Array.from(a);
    for (let i = 0; i < n; i++) l[i * n + i] = l[i * n + i]! + jitter * scale;
    if (choleskyInPlace(l, n)) return { l, jitter: jitter * scale };
  }
  // Fall back to the diagonal: draws become independent, which still gives a usable acquisition.
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) l[i * n + i] = Math.sqrt(Math.max(a[i * n + i]!, 0) + 1e-2 * scale);
  return { l, jitter: 1e-2 * scale };
}

function logMeanExp(values: Float64Array): number {
  let top = -Infinity;
  for (let s = 0; s < values.length; s++) if (values[s]! > top) top = values[s]!;
  if (top === -Infinity) return -Infinity;
  let sum = 0;
  for (let s = 0; s < values.length; s++) sum += Math.exp(values[s]! - top);
  return top + Math.log(sum / values.length);
}

/**
 * Noisy expected improvement over a fixed candidate set, in standardised goal units (the goal sign applied,
 * so larger is better), conditioned step by step on the trials chosen for a batch.
 */
export class NoisyImprovement {
  readonly model: GaussianProcessModel;
  readonly sign: number;
  readonly samples: number;
  private readonly sf2: number;
  private jitter: number;
  /** Conditioning points: distinct observed settings, then the chosen trials. */
  private readonly points: Float64Array[];
  private size: number;
  private readonly capacity: number;
  /** Cholesky factor of the noiseless covariance of the conditioning points (+ jitter), row stride `capacity`. */
  private readonly l: Float64Array;
  /** G = L⁻¹ F, the whitened draws: row i, column s (row stride `samples`). */
  private readonly g: Float64Array;
  /** Per draw, the best value among the conditioning points. */
  private readonly best: Float64Array;
  private readonly rng: RandomSource;
  /** Candidates and their running state. */
  readonly pool: readonly Float64Array[];
  private readonly whitened: Float64Array[];
  private readonly variance: Float64Array;
  /** Conditional means, candidate-major: mean[c · samples + s]. */
  private readonly means: Float64Array;

  constructor(model: GaussianProcessModel, sign: number, pool: readonly Float64Array[], extra: number, rng: RandomSource, samples = NOISY_IMPROVEMENT_SAMPLES) {
    this.model = model;
    this.sign = sign;
    this.samples = samples;
    this.rng = rng;
    this.sf2 = Math.exp(model.theta[model.d]!);
    // Distinct observed settings (replicates share one latent value).
    const seen = new Map<string, number>();
    const distinct: Float64Array[] = [];
    for (const x of model.inputs) {
      const key = Array.from(x).join(',');
      if (seen.has(key)) continue;
      seen.set(key, distinct.length);
      distinct.push(x);
    }
    const u = distinct.length;
    this.points = distinct.slice();
    this.size = u;
    this.capacity = u + extra;
    const S = samples;
    // Noiseless prior covariance of the distinct settings.
    const kuu = new Float64Array(u * u);
    for (let i = 0; i < u; i++) {
      for (let j = 0; j <= i; j++) {
        const v = j === i ? this.sf2 : pointCovariance(model, distinct[i]!, distinct[j]!);
        kuu[i * u + j] = v;
        kuu[j * u + i] = v;
      }
    }
    // Posterior of f at the distinct settings under the noisy model: mean K_UX α, covariance K_UU − VᵀV, V = L⁻¹ K_XU.
    const n = model.n;
    const v = new Float64Array(u * n);
    const mean = new Float64Array(u);
    for (let i = 0; i < u; i++) {
      const k = crossCovariance(model, distinct[i]!);
      let m = 0;
      for (let t = 0; t < n; t++) m += k[t]! * model.alpha[t]!;
      mean[i] = m;
      v.set(solveLower(model.cholesky, n, k), i * n);
    }
    const post = new Float64Array(u * u);
    for (let i = 0; i < u; i++) {
      for (let j = 0; j <= i; j++) {
        let dot = 0;
        const a = i * n;
        const b = j * n;
        for (let t = 0; t < n; t++) dot += v[a + t]! * v[b + t]!;
        const c = kuu[i * u + j]! - dot;
        post[i * u + j] = c;
        post[j * u + i] = c;
      }
    }
    const postChol = choleskyWithJitter(post, u, this.sf2).l;
    const z = stratifiedNormals(u, S, rng);
    // Draws in goal units: F = sign (mean + C Z), u × S.
    const f = new Float64Array(u * S);
    for (let i = 0; i < u; i++) {
      for (let s = 0; s < S; s++) {
        let acc = mean[i]!;
        for (let t = 0; t <= i; t++) acc += postChol[i * u + t]! * z[t * S + s]!;
        f[i * S + s] = sign * acc;
      }
    }
    this.best = new Float64Array(S).fill(-Infinity);
    for (let i = 0; i < u; i++) for (let s = 0; s < S; s++) this.best[s] = Math.max(this.best[s]!, f[i * S + s]!);
    // Noiseless factor and whitened draws G = L⁻¹ F.
    const factor = choleskyWithJitter(kuu, u, this.sf2);
    this.jitter = factor.jitter;
    this.l = new Float64Array(this.capacity * this.capacity);
    for (let i = 0; i < u; i++) for (let j = 0; j <= i; j++) this.l[i * this.capacity + j] = factor.l[i * u + j]!;
    this.g = new Float64Array(this.capacity * S);
    for (let i = 0; i < u; i++) {
      const li = i * this.capacity;
      for (let s = 0; s < S; s++) {
        let acc = f[i * S + s]!;
        for (let t = 0; t < i; t++) acc -= this.l[li + t]! * this.g[t * S + s]!;
        this.g[i * S + s] = acc / this.l[li + i]!;
      }
    }
    // Candidates.
    this.pool = pool;
    const m = pool.length;
    this.whitened = [];
    this.variance = new Float64Array(m);
    this.means = new Float64Array(m * S);
    for (let c = 0; c < m; c++) {
      const w = new Float64Array(this.capacity);
      w.set(this.whiten(pool[c]!));
      this.whitened.push(w);
      let vv = 0;
      for (let i = 0; i < u; i++) vv += w[i]! * w[i]!;
      this.variance[c] = Math.max(0, this.sf2 - vv);
      this.meansInto(w, this.means, c * S);
    }
  }

  /** An independent copy (same draws, same chosen trials) to grow another batch from. */
  clone(): NoisyImprovement {
    const copy = Object.create(NoisyImprovement.prototype) as NoisyImprovement;
    Object.assign(copy, this, {
      points: this.points.slice(),
      l: Float64Array.from(this.l),
      g: Float64Array.from(this.g),
      best: Float64Array.from(this.best),
      whitened: this.whitened.map((w) => Float64Array.from(w)),
      variance: Float64Array.from(this.variance),
      means: Float64Array.from(this.means),
    });
    return copy;
  }

  /** L⁻¹ k(P, x) over the current conditioning points. */
  private whiten(x: ArrayLike<number>): Float64Array {
    const size = this.size;
    const cap = this.capacity;
    const w = new Float64Array(size);
    for (let i = 0; i < size; i++) w[i] = pointCovariance(this.model, this.points[i]!, x);
    for (let i = 0; i < size; i++) {
      const row = i * cap;
      let s = w[i]!;
      for (let j = 0; j < i; j++) s -= this.l[row + j]! * w[j]!;
      w[i] = s / this.l[row + i]!;
    }
    return w;
  }

  /** Conditional means wᵀ G for every draw, written at `offset`. */
  private meansInto(w: ArrayLike<number>, out: Float64Array, offset: number): void {
    const S = this.samples;
    for (let s = 0; s < S; s++) out[offset + s] = 0;
    for (let i = 0; i < this.size; i++) {
      const wi = w[i]!;
      if (wi === 0) continue;
      const row = i * S;
      for (let s = 0; s < S; s++) out[offset + s] = out[offset + s]! + wi * this.g[row + s]!;
    }
  }

  private logFrom(means: Float64Array, offset: number, variance: number): number {
    const S = this.samples;
    const sd = Math.sqrt(variance + this.jitter);
    // Draws whose standardised margin lies more than 6 below the largest add under 1e-8 of the total each
    // (h(z − 6) / h(z) < 3e-9 for the EI factor h): they are left out rather than evaluated in the far tail.
    let zMax = -Infinity;
    for (let s = 0; s < S; s++) zMax = Math.max(zMax, (means[offset + s]! - this.best[s]!) / sd);
    const logs = new Float64Array(S).fill(-Infinity);
    for (let s = 0; s < S; s++) {
      const z = (means[offset + s]! - this.best[s]!) / sd;
      if (z >= zMax - 6) logs[s] = Math.log(sd) + logExpectedImprovementFactor(z);
    }
    return logMeanExp(logs);
  }

  /** log noisy EI of pool candidate c (standardised goal units). */
  logScore(c: number): number {
    return this.logFrom(this.means, c * this.samples, this.variance[c]!);
  }

  private stateAt(x: ArrayLike<number>): { means: Float64Array; variance: number; w: Float64Array } {
    const w = this.whiten(x);
    let vv = 0;
    for (let i = 0; i < w.length; i++) vv += w[i]! * w[i]!;
    const means = new Float64Array(this.samples);
    this.meansInto(w, means, 0);
    return { means, variance: Math.max(0, this.sf2 - vv), w };
  }

  /** log noisy EI at any coded point. */
  logScoreAt(x: ArrayLike<number>): number {
    const st = this.stateAt(x);
    return this.logFrom(st.means, 0, st.variance);
  }

  /** Noisy EI (standardised goal units) at a point, its log, and the average incumbent over the draws. */
  improvementAt(x: ArrayLike<number>): { value: number; log: number; incumbent: number } {
    const st = this.stateAt(x);
    const sd = Math.sqrt(st.variance + this.jitter);
    let value = 0;
    let incumbent = 0;
    for (let s = 0; s < this.samples; s++) {
      value += expectedImprovement(st.means[s]!, sd, this.best[s]!);
      incumbent += this.best[s]!;
    }
    return { value: value / this.samples, log: this.logFrom(st.means, 0, st.variance), incumbent: incumbent / this.samples };
  }

  /** Add a chosen trial at x: its value in each draw comes from the noiseless conditional given the draws so far. */
  add(x: Float64Array): void {
    const S = this.samples;
    const st = this.stateAt(x);
    const diagonal = Math.sqrt(st.variance + this.jitter);
    const sd = Math.sqrt(st.variance);
    const z = stratifiedNormals(1, S, this.rng);
    const row = this.size;
    const cap = this.capacity;
    for (let j = 0; j < row; j++) this.l[row * cap + j] = st.w[j]!;
    this.l[row * cap + row] = diagonal;
    for (let s = 0; s < S; s++) {
      const value = st.means[s]! + sd * z[s]!;
      this.g[row * S + s] = (value - st.means[s]!) / diagonal;
      this.best[s] = Math.max(this.best[s]!, value);
    }
    this.points.push(x);
    this.size++;
    // Candidates: the new whitened component, then the means and variances it changes.
    for (let c = 0; c < this.pool.length; c++) {
      const w = this.whitened[c]!;
      let dot = 0;
      for (let i = 0; i < row; i++) dot += w[i]! * st.w[i]!;
      const uc = (pointCovariance(this.model, this.pool[c]!, x) - dot) / diagonal;
      w[row] = uc;
      this.variance[c] = Math.max(0, this.variance[c]! - uc * uc);
      const off = c * S;
      for (let s = 0; s < S; s++) this.means[off + s] = this.means[off + s]! + uc * this.g[row * S + s]!;
    }
  }
}

/**
 * Noisy expected improvement at coded points in response units (for `goal`), with the draws taken from `rng`.
 * A convenience over NoisyImprovement for reports and checks.
 */
export function noisyExpectedImprovement(
  model: GaussianProcessModel,
  points: readonly ArrayLike<number>[],
  goal: 'maximize' | 'minimize',
  rng: RandomSource,
  samples = NOISY_IMPROVEMENT_SAMPLES,
): number[] {
  const nei = new NoisyImprovement(model, goal === 'maximize' ? 1 : -1, [], 0, rng, samples);
  return points.map((p) => nei.improvementAt(p).value * model.yScale);
}
