/**
 * Several responses at once: individual desirabilities d ∈ [0, 1] for maximise / minimise / target
 * goals, their weighted geometric mean D, and the factor setting that maximises D within the factor
 * space and its constraints.
 */
// Derringer & Suich (1980), Journal of Quality Technology 12:214-219
import { invalidInput } from '../errors';
import { decodePoint, isFeasible, type Factor, type FactorSpace, type Point, type ResponseDefinition } from '../factors';
import { seededRandom } from '../random';

export interface DesirabilityResponse extends ResponseDefinition {
  /** Shape exponent for maximise / minimise (default 1: linear). */
  shape?: number;
  /** Shape exponents below and above the target (default 1). */
  shapeLow?: number;
  shapeHigh?: number;
  /** Relative importance in the geometric mean (default 1). */
  importance?: number;
}

function limits(r: DesirabilityResponse): { low: number; high: number; target?: number } {
  if (r.goal === 'maximize') {
    const low = r.lower;
    const high = r.target ?? r.upper;
    if (low === undefined || high === undefined) throw invalidInput(`responses.${r.name}`, `to maximise ${r.name}, give lower (unacceptable at or below) and target or upper (fully satisfactory)`);
    if (!(high > low)) throw invalidInput(`responses.${r.name}`, `for ${r.name} the fully satisfactory value must exceed the lower limit`);
    return { low, high };
  }
  if (r.goal === 'minimize') {
    const low = r.target ?? r.lower;
    const high = r.upper;
    if (low === undefined || high === undefined) throw invalidInput(`responses.${r.name}`, `to minimise ${r.name}, give upper (unacceptable at or above) and target or lower (fully satisfactory)`);
    if (!(high > low)) throw invalidInput(`responses.${r.name}`, `for ${r.name} the upper limit must exceed the fully satisfactory value`);
    return { low, high };
  }
  const { lower: low, upper: high, target } = r;
  if (low === undefined || high === undefined || target === undefined) throw invalidInput(`responses.${r.name}`, `a target goal for ${r.name} needs lower, target and upper`);
  if (!(low < target && target < high)) throw invalidInput(`responses.${r.name}`, `for ${r.name} the target must lie strictly between lower and upper`);
  return { low, high, target };
}

/** Individual desirability of one response value. */
export function individualDesirability(y: number, r: DesirabilityResponse): number {
  if (!Number.isFinite(y)) return 0;
  const { low, high, target } = limits(r);
  if (r.goal === 'maximize') {
    if (y <= low) return 0;
    if (y >= high) return 1;
    return Math.pow((y - low) / (high - low), r.shape ?? 1);
  }
  if (r.goal === 'minimize') {
    if (y >= high) return 0;
    if (y <= low) return 1;
    return Math.pow((high - y) / (high - low), r.shape ?? 1);
  }
  const t = target!;
  if (y <= low || y >= high) return 0;
  if (y <= t) return Math.pow((y - low) / (t - low), r.shapeLow ?? 1);
  return Math.pow((high - y) / (high - t), r.shapeHigh ?? 1);
}

export interface DesirabilityValue {
  /** Overall desirability: weighted geometric mean of the individual ones. */
  overall: number;
  individual: Record<string, number>;
}

/** Individual and overall desirability of a set of response values (keyed by response name). */
export function desirability(values: Record<string, number>, responses: readonly DesirabilityResponse[]): DesirabilityValue {
  if (responses.length === 0) throw invalidInput('responses', 'name at least one response with its goal and limits');
  const individual: Record<string, number> = {};
  let logSum = 0;
  let weightSum = 0;
  let zero = false;
  for (const r of responses) {
    const v = values[r.name];
    if (v === undefined) throw invalidInput(`values.${r.name}`, `no value for response ${r.name}`);
    const d = individualDesirability(v, r);
    individual[r.name] = d;
    const w = r.importance ?? 1;
    if (!(w > 0)) throw invalidInput(`responses.${r.name}`, `importance of ${r.name} must be positive`);
    weightSum += w;
    if (d === 0) zero = true;
    else logSum += w * Math.log(d);
  }
  return { overall: zero ? 0 : Math.exp(logSum / weightSum), individual };
}

/** Distance of a value outside its acceptable range, in units of the range (0 inside). */
function shortfall(y: number, r: DesirabilityResponse): number {
  const { low, high } = limits(r);
  const span = high - low;
  if (r.goal === 'maximize') return y <= low ? (low - y) / span + 1e-9 : 0;
  if (r.goal === 'minimize') return y >= high ? (y - high) / span + 1e-9 : 0;
  if (y <= low) return (low - y) / span + 1e-9;
  if (y >= high) return (y - high) / span + 1e-9;
  return 0;
}

export interface MaximizeDesirabilityOptions {
  /** The factor space searched (numeric factors within [low, high]; categorical levels enumerated). */
  space: FactorSpace;
  /** Predicted value of each response at a point in natural units. */
  predict: (point: Point) => Record<string, number>;
  responses: DesirabilityResponse[];
  /** Random starts for the local search (default 40). */
  starts?: number;
  seed?: number;
}

export interface DesirabilityOptimum {
  point: Point;
  desirability: number;
  individual: Record<string, number>;
  predicted: Record<string, number>;
}

/** Nelder–Mead on a box [-1, 1]^k, with the objective given by the caller (to be maximised). */
function nelderMeadBox(f: (x: number[]) => number, x0: number[], step: number, iterations: number): { x: number[]; value: number } {
  const k = x0.length;
  const clamp = (x: number[]) => x.map((v) => Math.max(-1, Math.min(1, v)));
  let simplex: { x: number[]; v: number }[] = [{ x: clamp(x0), v: f(clamp(x0)) }];
  for (let i = 0; i < k; i++) {
    const x = x0.slice();
    x[i] = x[i]! + (x[i]! + step > 1 ? -step : step);
    const cx = clamp(x);
    simplex.push({ x: cx, v: f(cx) });
  }
  for (let it = 0; it < iterations; it++) {
    simplex.sort((a, b) => b.v - a.v);
    const best = simplex[0]!;
    const worst = simplex[k]!;
    if (Math.abs(best.v - worst.v) < 1e-12 && it > 10) break;
    const centroid = new Array<number>(k).fill(0);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) centroid[j] += simplex[i]!.x[j]! / k;
    const along = (t: number) => clamp(centroid.map((c, j) => c + t * (worst.x[j]! - c)));
    const xr = along(-1);
    const vr = f(xr);
    if (vr > best.v) {
      const xe = along(-2);
      const ve = f(xe);
      simplex[k] = ve > vr ? { x: xe, v: ve } : { x: xr, v: vr };
    } else if (vr > simplex[k - 1]!.v) {
      simplex[k] = { x: xr, v: vr };
    } else {
      const xc = along(0.5);
      const vc = f(xc);
      if (vc > worst.v) simplex[k] = { x: xc, v: vc };
      else simplex = simplex.map((s, i) => (i === 0 ? s : { x: s.x.map((v, j) => best.x[j]! + 0.5 * (v - best.x[j]!)), v: f(s.x.map((v, j) => best.x[j]! + 0.5 * (v - best.x[j]!))) }));
    }
  }
  simplex.sort((a, b) => b.v - a.v);
  return { x: simplex[0]!.x, value: simplex[0]!.v };
}

/**
 * The feasible factor setting with the largest overall desirability: categorical level
 * combinations enumerated (or sampled when there are many), numeric factors searched in coded
 * units from seeded random starts by Nelder–Mead; infeasible points and points with a zero
 * desirability are steered by how far they fall outside.
 */
export function maximizeDesirability(options: MaximizeDesirabilityOptions): DesirabilityOptimum {
  const { space, predict, responses } = options;
  const factors: Factor[] = space.factors;
  if (factors.length === 0) throw invalidInput('space.factors', 'the factor space has no factors');
  const numeric = factors.map((f, i) => ({ f, i })).filter(({ f }) => f.kind !== 'categorical');
  const categorical = factors.map((f, i) => ({ f, i })).filter(({ f }) => f.kind === 'categorical');
  const rng = seededRandom(options.seed ?? 1);
  let combos: number[][] = [[]];
  for (const { f } of categorical) {
    const n = f.kind === 'categorical' ? f.levels.length : 0;
    const next: number[][] = [];
    for (const c of combos) for (let l = 0; l < n; l++) next.push([...c, l]);
    combos = next;
    if (combos.length > 64) break;
  }
  if (combos.length > 64) {
    combos = Array.from({ length: 64 }, () => categorical.map(({ f }) => Math.floor(rng.next() * (f.kind === 'categorical' ? f.levels.length : 1))));
  }
  const toPoint = (x: number[], combo: number[]): Point => {
    const coded = new Array<number>(factors.length).fill(0);
    numeric.forEach(({ i }, k) => { coded[i] = x[k]!; });
    categorical.forEach(({ i }, k) => { coded[i] = combo[k]!; });
    return decodePoint(factors, coded);
  };
  const score = (point: Point): { value: number; d: DesirabilityValue; predicted: Record<string, number> } => {
    const predicted = predict(point);
    const d = desirability(predicted, responses);
    let penalty = 0;
    if (!isFeasible(space, point)) penalty += 1;
    if (penalty > 0) return { value: -1 - penalty, d, predicted };
    if (d.overall > 0) return { value: d.overall, d, predicted };
    let miss = 0;
    for (const r of responses) miss += shortfall(predicted[r.name]!, r);
    return { value: -miss / (1 + miss), d, predicted };
  };
  let best: { point: Point; value: number; d: DesirabilityValue; predicted: Record<string, number> } | undefined;
  const starts = Math.max(1, options.starts ?? 40);
  for (const combo of combos) {
    const k = numeric.length;
    const candidates: { x: number[]; v: number }[] = [];
    for (let s = 0; s < starts * 5; s++) {
      const x = Array.from({ length: k }, () => 2 * rng.next() - 1);
      candidates.push({ x, v: score(toPoint(x, combo)).value });
    }
    candidates.sort((a, b) => b.v - a.v);
    const seeds = k === 0 ? [{ x: [], v: 0 }] : candidates.slice(0, Math.max(1, Math.ceil(starts / Math.max(1, combos.length / 4))));
    for (const seed of seeds) {
      const res = k === 0 ? { x: [] as number[] } : nelderMeadBox((x) => score(toPoint(x, combo)).value, seed.x, 0.25, 200 * k);
      const point = toPoint(res.x, combo);
      const sc = score(point);
      if (!best || sc.value > best.value) best = { point, ...sc };
    }
  }
  return { point: best!.point, desirability: best!.d.overall, individual: best!.d.individual, predicted: best!.predicted };
}
