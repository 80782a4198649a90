/**
 * The next run where the current model knows least: the candidate with the largest prediction
 * variance x'(X'X)^-1 x under the model fitted to the runs made so far.
 */
// Myers, Montgomery & Anderson-Cook (2016), Response Surface Methodology, 4th ed., §8.2 (scaled prediction variance)
import { DomainError, invalidInput } from '../errors';
import {
  codePoint,
  compileModel,
  decodePoint,
  INTERCEPT,
  isFeasible,
  modelMatrix,
  parseTerm,
  standardTerms,
  validateSpace,
  type DisallowedCombination,
  type Factor,
  type LinearConstraint,
  type ModelTerm,
  type Point,
  type StandardModel,
} from '../factors';
import { seededRandom, randomInt, type RandomSource } from '../random';
import { codedLevels, standardOrder } from './levels';
import { cholesky, informationMatrix, inverseFromCholesky, quadraticForm } from './linear-algebra';

export interface NextRunOptions {
  constraints?: LinearConstraint[];
  disallowed?: DisallowedCombination[];
  seed?: number;
  /** Size of the candidate set (default 2000): a grid when it fits, seeded random points otherwise. */
  candidates?: number;
}

export interface NextRunByVariance {
  values: Point;
  /** n · x'(X'X)^-1 x, n the number of existing points (prediction variance per σ², scaled by n). */
  scaledPredictionVariance: number;
  /** x'(X'X)^-1 x. */
  predictionVariance: number;
  /** Ridge added to X'X's diagonal because it was singular (0 when none was needed). */
  ridge: number;
  candidatesEvaluated: number;
}

/** Resolve a model given as term strings (intercept added when absent) or as a standard model name. */
export function resolveTerms(factors: readonly Factor[], terms: readonly string[] | StandardModel, field = 'terms'): ModelTerm[] {
  if (typeof terms === 'string') {
    if (!['main-effects', 'interactions', 'quadratic'].includes(terms)) throw invalidInput(field, 'model must be "main-effects", "interactions" or "quadratic"');
    return standardTerms(factors, terms);
  }
  const parsed = terms.map((t) => parseTerm(t, factors, field));
  const seen = new Set<string>();
  const out: ModelTerm[] = [];
  if (!parsed.some((t) => t.parts.length === 0)) out.push(INTERCEPT);
  for (const t of parsed) {
    if (seen.has(t.label)) continue;
    seen.add(t.label);
    out.push(t);
  }
  return out;
}

/** Candidate points (coded) inside the factor space: a grid when it fits, seeded random points otherwise. */
export function candidateSet(factors: readonly Factor[], size: number, rng: RandomSource): number[][] {
  const fixed = factors.map((f) => (f.kind === 'continuous' ? 0 : codedLevels(f, []).length));
  const otherCount = fixed.reduce((a, c) => (c > 0 ? a * c : a), 1);
  const nContinuous = factors.filter((f) => f.kind === 'continuous').length;
  let perAxis = 0;
  for (let m = 11; m >= 2; m--) {
    if (otherCount * Math.pow(m, nContinuous) <= size) {
      perAxis = m;
      break;
    }
  }
  if (perAxis > 0 || (nContinuous === 0 && otherCount <= size)) {
    const m = Math.max(perAxis, 2);
    const grid = Array.from({ length: m }, (_, i) => -1 + (2 * i) / (m - 1));
    return standardOrder(factors.map((f) => codedLevels(f, grid)));
  }
  const lists = factors.map((f) => codedLevels(f, [-1, 1]));
  const out: number[][] = [];
  for (let i = 0; i < size; i++) {
    out.push(
      factors.map((f, j) => {
        if (f.kind === 'continuous') {
          // Half the candidates at vertices of the cube, where variance is usually largest.
          return i % 2 === 0 ? lists[j]![randomInt(rng, 2)]! : -1 + 2 * rng.next();
        }
        return lists[j]![randomInt(rng, lists[j]!.length)]!;
      }),
    );
  }
  return out;
}

export function nextRunByPredictionVariance(
  factors: Factor[],
  terms: string[] | StandardModel,
  existingPoints: Point[],
  options: NextRunOptions = {},
): NextRunByVariance {
  validateSpace({ factors, constraints: options.constraints, disallowed: options.disallowed });
  const size = options.candidates ?? 2000;
  if (!Number.isInteger(size) || size < 1 || size > 200_000) throw invalidInput('candidates', 'candidates must be a whole number between 1 and 200000');
  const model = compileModel(factors, resolveTerms(factors, terms));
  const codedExisting = existingPoints.map((pt, i) => {
    try {
      return codePoint(factors, pt);
    } catch (e) {
      if (e instanceof DomainError) throw invalidInput(`existingPoints[${i}].${e.field ?? ''}`, e.message);
      throw e;
    }
  });
  const { data, n, p } = modelMatrix(model, codedExisting);
  const xtx = informationMatrix(data, n, p);
  let ridge = 0;
  let l = cholesky(xtx, p);
  if (!l) {
    // Too few or too similar runs for this model: a tiny ridge keeps the variance finite and
    // ranks the directions the runs have not explored highest.
    let trace = 0;
    for (let i = 0; i < p; i++) trace += xtx[i * p + i]!;
    ridge = 1e-6 * Math.max(trace / p, 1);
    for (let i = 0; i < p; i++) xtx[i * p + i]! += ridge;
    l = cholesky(xtx, p);
    if (!l) throw new DomainError('singular_design', 'the existing runs give a singular information matrix even with a ridge', 'existingPoints');
  }
  const inv = inverseFromCholesky(l, p);
  const space = { factors, constraints: options.constraints, disallowed: options.disallowed };
  const rng = seededRandom(options.seed ?? 1);
  const row = new Float64Array(p);
  let best: { coded: number[]; v: number } | null = null;
  let evaluated = 0;
  for (const c of candidateSet(factors, size, rng)) {
    const values = decodePoint(factors, c);
    if (!isFeasible(space, values)) continue;
    evaluated++;
    const v = quadraticForm(inv, model.row(c, row), p);
    if (!best || v > best.v + 1e-12) best = { coded: c, v };
  }
  if (!best) throw new DomainError('infeasible', 'no candidate point satisfies the constraints; check them against the factor ranges', 'constraints');
  return {
    values: decodePoint(factors, best.coded),
    scaledPredictionVariance: Math.max(n, 1) * best.v,
    predictionVariance: best.v,
    ridge,
    candidatesEvaluated: evaluated,
  };
}
