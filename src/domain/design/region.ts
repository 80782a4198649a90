/**
 * The design region in coded units: linear constraints and disallowed combinations as fast checks
 * on coded vectors, random feasible points, and the moment matrix W = average of f(x) f(x)' over
 * the region used by the I-criterion and the I-efficiency.
 */
import { DomainError } from '../errors';
import { codePoint, compileModel, numericRange, type CompiledModel, type Factor, type FactorSpace, type ModelTerm } from '../factors';
import { randomInt, type RandomSource } from '../random';

export interface CodedRegion {
  factors: readonly Factor[];
  /** True when a coded point satisfies every constraint and no disallowed combination. */
  feasible(coded: ArrayLike<number>): boolean;
  /** Coded values of factor j at which some linear constraint becomes tight, the rest of `coded` held. */
  boundaryValues(coded: ArrayLike<number>, j: number): number[];
  constrained: boolean;
}

interface CodedConstraint {
  /** offset + Σ a_j x_j, in natural units of the constraint. */
  a: Float64Array;
  offset: number;
  min: number;
  max: number;
}

export function codedRegion(space: FactorSpace): CodedRegion {
  const { factors } = space;
  const k = factors.length;
  const index = new Map(factors.map((f, i) => [f.name, i]));
  const linear: CodedConstraint[] = (space.constraints ?? []).map((c) => {
    const a = new Float64Array(k);
    let offset = 0;
    for (const [name, coef] of Object.entries(c.terms)) {
      const j = index.get(name)!;
      const f = factors[j]!;
      if (f.kind === 'categorical') continue;
      const { low, high } = numericRange(f);
      a[j] = (coef * (high - low)) / 2;
      offset += coef * (low + (high - low) / 2);
    }
    return { a, offset, min: c.min ?? -Infinity, max: c.max ?? Infinity };
  });
  const disallowed = (space.disallowed ?? []).map((d) => {
    const entries = Object.entries(d.levels).map(([name, value]) => {
      const j = index.get(name)!;
      const f = factors[j]!;
      const sub = codePoint([f], { [name]: value })[0]!;
      return { j, coded: sub };
    });
    return entries;
  });
  const tol = 1e-9;
  const value = (c: CodedConstraint, x: ArrayLike<number>) => {
    let s = c.offset;
    for (let j = 0; j < k; j++) if (c.a[j] !== 0) s += c.a[j]! * x[j]!;
    return s;
  };
  return {
    factors,
    constrained: linear.length > 0 || disallowed.length > 0,
    feasible(x) {
      for (const c of linear) {
        const v = value(c, x);
        const scale = 1 + Math.abs(c.offset);
        if (v < c.min - tol * scale || v > c.max + tol * scale) return false;
      }
      for (const d of disallowed) if (d.every((e) => Math.abs(x[e.j]! - e.coded) < 1e-9)) return false;
      return true;
    },
    boundaryValues(x, j) {
      const out: number[] = [];
      for (const c of linear) {
        const aj = c.a[j]!;
        if (aj === 0) continue;
        const rest = value(c, x) - aj * x[j]!;
        for (const bound of [c.min, c.max]) {
          if (!Number.isFinite(bound)) continue;
          const xj = (bound - rest) / aj;
          if (xj >= -1 - 1e-12 && xj <= 1 + 1e-12) out.push(Math.min(1, Math.max(-1, xj)));
        }
      }
      return out;
    },
  };
}

/** A random feasible coded point: numeric coordinates from `levels` (or uniform), categorical levels at random. */
export function randomFeasiblePoint(
  region: CodedRegion,
  levels: readonly (readonly number[])[],
  rng: RandomSource,
  fixed: ReadonlyMap<number, number> = new Map(),
): number[] | null {
  const k = region.factors.length;
  for (let attempt = 0; attempt < 2000; attempt++) {
    const uniform = attempt >= 200;
    const x = new Array<number>(k);
    for (let j = 0; j < k; j++) {
      const fx = fixed.get(j);
      if (fx !== undefined) x[j] = fx;
      else if (uniform && region.factors[j]!.kind === 'continuous') x[j] = -1 + 2 * rng.next();
      else x[j] = levels[j]![randomInt(rng, levels[j]!.length)]!;
    }
    if (region.feasible(x)) return x;
  }
  return null;
}

/**
 * W = E[f(x) f(x)'] over the region, x uniform on [-1, 1] for continuous factors and uniform over
 * the allowed values or levels otherwise. Exact (factor by factor) when there are no constraints;
 * a seeded Monte Carlo average over feasible points otherwise.
 */
export function momentMatrix(region: CodedRegion, terms: readonly ModelTerm[], rng: RandomSource, samples = 4096): Float64Array {
  const model = compileModel(region.factors, terms);
  const p = model.p;
  if (!region.constrained) return exactMoments(region.factors, model);
  const w = new Float64Array(p * p);
  const row = new Float64Array(p);
  const levels = region.factors.map((f) =>
    f.kind === 'categorical' ? f.levels.map((_, i) => i) : f.kind === 'discrete' ? f.values.map((v) => codePoint([f], { [f.name]: v })[0]!) : [0],
  );
  let count = 0;
  for (let s = 0; s < samples * 20 && count < samples; s++) {
    const x = region.factors.map((f, j) => (f.kind === 'continuous' ? -1 + 2 * rng.next() : levels[j]![randomInt(rng, levels[j]!.length)]!));
    if (!region.feasible(x)) continue;
    model.row(x, row);
    for (let a = 0; a < p; a++) for (let b = a; b < p; b++) w[a * p + b]! += row[a]! * row[b]!;
    count++;
  }
  if (count === 0) throw new DomainError('infeasible', 'no point of the factor space satisfies the constraints', 'constraints');
  for (let a = 0; a < p; a++) for (let b = a; b < p; b++) w[b * p + a] = w[a * p + b]! /= count;
  return w;
}

/** Column a of the model matrix as a product over factors: factor j enters as x^power or an effect-code column. */
type ColumnPart = { j: number; power: number; catColumn: number };

export function columnFactorParts(factors: readonly Factor[], terms: readonly ModelTerm[]): ColumnPart[][] {
  // Same column order as compileModel: within a term, the last part varies fastest.
  const index = new Map(factors.map((f, i) => [f.name, i]));
  const columns: ColumnPart[][] = [];
  for (const t of terms) {
    let combos: ColumnPart[][] = [[]];
    for (const part of t.parts) {
      const j = index.get(part.name)!;
      const f = factors[j]!;
      const pieces: ColumnPart[] =
        f.kind === 'categorical'
          ? f.levels.slice(0, -1).map((_, c) => ({ j, power: 1, catColumn: c }))
          : [{ j, power: part.power, catColumn: -1 }];
      const next: ColumnPart[][] = [];
      for (const c of combos) for (const piece of pieces) next.push([...c, piece]);
      combos = next;
    }
    columns.push(...combos);
  }
  return columns;
}

function partValue(f: Factor, part: ColumnPart | undefined, x: number): number {
  if (!part) return 1;
  if (f.kind === 'categorical') {
    const lvl = Math.round(x);
    return lvl === part.catColumn ? 1 : lvl === f.levels.length - 1 ? -1 : 0;
  }
  return part.power === 1 ? x : Math.pow(x, part.power);
}

function exactMoments(factors: readonly Factor[], model: CompiledModel): Float64Array {
  // W_ab = Π_j E[φ_aj(x_j) φ_bj(x_j)] because the factors vary independently over an unconstrained
  // region; each expectation uses a rule exact for the model's functions of that factor:
  // Gauss–Legendre nodes for continuous factors, the allowed values or levels otherwise.
  const p = model.p;
  const columns = columnFactorParts(factors, model.terms);
  const w = new Float64Array(p * p).fill(1);
  factors.forEach((f, j) => {
    const parts = columns.map((c) => c.find((q) => q.j === j));
    let maxPower = 0;
    for (const q of parts) if (q) maxPower = Math.max(maxPower, q.power);
    const nodes =
      f.kind === 'categorical'
        ? f.levels.map((_, i) => ({ x: i, w: 1 / f.levels.length }))
        : f.kind === 'discrete'
          ? f.values.map((v) => ({ x: codePoint([f], { [f.name]: v })[0]!, w: 1 / f.values.length }))
          : gaussLegendre(maxPower + 1);
    const values = nodes.map((nd) => parts.map((q) => partValue(f, q, nd.x)));
    for (let a = 0; a < p; a++) {
      for (let b = a; b < p; b++) {
        if (!parts[a] && !parts[b]) continue;
        let e = 0;
        nodes.forEach((nd, q) => (e += nd.w * values[q]![a]! * values[q]![b]!));
        w[a * p + b]! *= e;
      }
    }
  });
  for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) w[a * p + b] = w[b * p + a]!;
  return w;
}

function gaussLegendre(n: number): { x: number; w: number }[] {
  // Golub–Welsch would be general; the model powers here stay small, so tabulated nodes suffice.
  // Weights are halved for the uniform probability measure on [-1, 1].
  const table: Record<number, [number, number][]> = {
    1: [[0, 2]],
    2: [[-1 / Math.sqrt(3), 1], [1 / Math.sqrt(3), 1]],
    3: [[-Math.sqrt(3 / 5), 5 / 9], [0, 8 / 9], [Math.sqrt(3 / 5), 5 / 9]],
  };
  if (table[n]) return table[n]!.map(([x, w]) => ({ x, w: w / 2 }));
  // Higher powers: Newton iteration on Legendre polynomials.
  const out: { x: number; w: number }[] = [];
  for (let i = 1; i <= n; i++) {
    let x = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = x;
      for (let m = 2; m <= n; m++) {
        const p2 = ((2 * m - 1) * x * p1 - (m - 1) * p0) / m;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-15) break;
    }
    out.push({ x, w: 1 / ((1 - x * x) * dp * dp) });
  }
  return out;
}
