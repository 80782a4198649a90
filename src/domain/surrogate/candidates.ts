/**
 * Candidate points in coded space for maximising an acquisition function: a seeded Latin-hypercube
 * spread over the whole space plus Gaussian perturbations around promising points, each snapped to
 * allowed values (discrete factors, categorical levels) and kept only when it honours the space's
 * constraints.
 */
import { decodePoint, isFeasible, toCoded, type Factor, type FactorSpace, type Point } from '../factors';
import { randomNormal, shuffled, type RandomSource } from '../random';

/** Snap a coded vector onto the allowed set: clamp numeric to [-1, 1], discrete to its nearest value, categorical to a level index. */
export function snapCoded(factors: readonly Factor[], coded: ArrayLike<number>): Float64Array {
  const out = new Float64Array(factors.length);
  factors.forEach((f, k) => {
    const c = coded[k]!;
    if (f.kind === 'categorical') out[k] = Math.min(f.levels.length - 1, Math.max(0, Math.round(c)));
    else if (f.kind === 'continuous') out[k] = Math.min(1, Math.max(-1, c));
    else {
      const clamped = Math.min(1, Math.max(-1, c));
      let best = toCoded(f, f.values[0]!);
      for (const v of f.values) {
        const cv = toCoded(f, v);
        if (Math.abs(cv - clamped) < Math.abs(best - clamped)) best = cv;
      }
      out[k] = best;
    }
  });
  return out;
}

export function feasibleCoded(space: FactorSpace, coded: ArrayLike<number>): Point | null {
  const point = decodePoint(space.factors, Array.from(coded));
  return isFeasible(space, point) ? point : null;
}

/** `count` Latin-hypercube points (numeric coordinates stratified, categorical levels balanced), snapped. */
export function latinHypercubeCandidates(factors: readonly Factor[], count: number, rng: RandomSource): Float64Array[] {
  const d = factors.length;
  const columns: number[][] = factors.map((f) => {
    if (f.kind === 'categorical') {
      const levels = Array.from({ length: count }, (_, i) => i % f.levels.length);
      return shuffled(levels, rng);
    }
    const strata = shuffled(Array.from({ length: count }, (_, i) => i), rng);
    return strata.map((s) => -1 + (2 * (s + rng.next())) / count);
  });
  const points: Float64Array[] = [];
  for (let i = 0; i < count; i++) {
    const raw = new Float64Array(d);
    for (let k = 0; k < d; k++) raw[k] = columns[k]![i]!;
    points.push(snapCoded(factors, raw));
  }
  return points;
}

/** Gaussian perturbations (sd `scale` in coded units) of numeric coordinates around `centre`, snapped. */
export function perturbations(factors: readonly Factor[], centre: ArrayLike<number>, count: number, scale: number, rng: RandomSource): Float64Array[] {
  const out: Float64Array[] = [];
  for (let i = 0; i < count; i++) {
    const raw = new Float64Array(factors.length);
    factors.forEach((f, k) => {
      raw[k] = f.kind === 'categorical' ? centre[k]! : centre[k]! + scale * randomNormal(rng);
    });
    out.push(snapCoded(factors, raw));
  }
  return out;
}
