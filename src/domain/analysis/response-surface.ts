/**
 * Response surfaces from a fitted second-order model: the quadratic form ŷ = c + bᵀx + xᵀBx in the
 * model's units (coded when the analysis was coded), its stationary point, canonical analysis
 * (eigenvalues and directions of B) with a classification, the path of steepest ascent, ridge
 * analysis, and grid data for contour, slice and interaction plots.
 */
// Box & Wilson (1951), J. R. Stat. Soc. B 13:1-45 (steepest ascent, canonical analysis)
// Hoerl (1959), Chemical Engineering Progress 55:69-78; Draper (1963), Technometrics 5:469-479 (ridge analysis)
import { EigenvalueDecomposition, Matrix, solve } from 'ml-matrix';
import { DomainError, invalidInput } from '../errors';
import { compileModel, INTERCEPT, parseTerm, toNatural, numericRange, type Factor, type NumericFactor, type Point } from '../factors';
import type { AnalysisResult } from './types';

export interface QuadraticForm {
  /** Numeric factors, in the order of b and B. */
  factors: string[];
  /** Units of x: "coded" ([-1, 1] over each factor's range) or "natural". */
  units: 'coded' | 'natural';
  constant: number;
  linear: number[];
  /** Symmetric: B_ii the pure quadratic coefficients, B_ij half the two-factor interactions. */
  quadratic: number[][];
}

export type SurfaceKind = 'maximum' | 'minimum' | 'saddle' | 'ridge';

export interface CanonicalAnalysis {
  /** Eigenvalues of B, ascending. */
  eigenvalues: number[];
  /** Unit eigenvectors (one per eigenvalue), in factor order. */
  directions: number[][];
  kind: SurfaceKind;
}

export interface StationaryPoint {
  /** In the model's units. */
  point: number[];
  /** In natural units, keyed by factor name. */
  natural: Record<string, number>;
  predicted: number;
  /** Distance from the design centre in the model's units. */
  distance: number;
}

interface SurfaceModel {
  numeric: { f: NumericFactor; index: number }[];
  /** Value of the fitted model at numeric x (model units) with categorical factors held. */
  at(x: readonly number[]): number;
}

function heldLevelIndex(f: Factor, held: Point | undefined): number {
  if (f.kind !== 'categorical') return 0;
  const v = held?.[f.name];
  if (v === undefined) return 0;
  const i = f.levels.indexOf(String(v));
  if (i < 0) throw invalidInput(`held.${f.name}`, `"${String(v)}" is not a level of ${f.name}; use one of: ${f.levels.join(', ')}`);
  return i;
}

function surfaceModel(result: AnalysisResult, held?: Point): SurfaceModel {
  if (result.family !== 'gaussian') throw new DomainError('unsupported', 'response surfaces need a gaussian (least squares) analysis', 'family');
  const factors = result.factors;
  const terms = [...(result.intercept ? [INTERCEPT] : []), ...result.terms.map((t) => parseTerm(t, factors))];
  const model = compileModel(factors, terms);
  const colOf = new Map(model.labels.map((l, j) => [l, j]));
  const beta = new Float64Array(model.p);
  for (const c of result.coefficients) beta[colOf.get(c.term)!] = c.estimate;
  const numeric = factors.map((f, index) => ({ f, index })).filter((e): e is { f: NumericFactor; index: number } => e.f.kind !== 'categorical');
  const base = factors.map((f) => heldLevelIndex(f, held));
  const row = new Float64Array(model.p);
  return {
    numeric,
    at(x) {
      const v = base.slice();
      numeric.forEach(({ index }, k) => { v[index] = x[k]!; });
      model.row(v, row);
      let s = 0;
      for (let j = 0; j < model.p; j++) s += row[j]! * beta[j]!;
      return s;
    },
  };
}

/**
 * The fitted model as a quadratic form in its numeric factors (categorical factors held at the
 * given levels, else their first level). Throws when the model has terms beyond second order.
 */
export function quadraticForm(result: AnalysisResult, held?: Point): QuadraticForm {
  const sm = surfaceModel(result, held);
  const k = sm.numeric.length;
  if (k === 0) throw invalidInput('terms', 'the model has no numeric factors, so it has no response surface');
  const zero = new Array<number>(k).fill(0);
  const unit = (i: number, s: number, j = -1, t = 0) => zero.map((_, m) => (m === i ? s : 0) + (m === j ? t : 0));
  const c = sm.at(zero);
  const b = zero.map((_, i) => (sm.at(unit(i, 1)) - sm.at(unit(i, -1))) / 2);
  const B = zero.map(() => zero.slice());
  for (let i = 0; i < k; i++) {
    B[i]![i] = (sm.at(unit(i, 1)) + sm.at(unit(i, -1)) - 2 * c) / 2;
    for (let j = i + 1; j < k; j++) {
      const v = (sm.at(unit(i, 1, j, 1)) - sm.at(unit(i, 1, j, -1)) - sm.at(unit(i, -1, j, 1)) + sm.at(unit(i, -1, j, -1))) / 8;
      B[i]![j] = v;
      B[j]![i] = v;
    }
  }
  // A second-order model is reproduced exactly at any point; check two off-grid points.
  const quad = (x: number[]) => c + x.reduce((s, xi, i) => s + b[i]! * xi + x.reduce((t, xj, j) => t + xi * B[i]![j]! * xj, 0), 0);
  for (const probe of [zero.map((_, i) => 0.37 + 0.11 * i), zero.map((_, i) => -0.53 + 0.07 * i * i)]) {
    const want = sm.at(probe);
    const scale = Math.abs(c) + b.reduce((s, v) => s + Math.abs(v), 0) + B.flat().reduce((s, v) => s + Math.abs(v), 0) + 1e-300;
    if (Math.abs(want - quad(probe)) > 1e-8 * scale) {
      throw new DomainError('unsupported', 'the model has terms beyond second order in its numeric factors; canonical analysis needs a model with at most squares and two-factor products', 'terms');
    }
  }
  return { factors: sm.numeric.map(({ f }) => f.name), units: result.coding, constant: c, linear: b, quadratic: B };
}

function toNaturalVector(result: AnalysisResult, form: QuadraticForm, x: readonly number[]): Record<string, number> {
  const out: Record<string, number> = {};
  form.factors.forEach((name, i) => {
    const f = result.factors.find((g) => g.name === name) as NumericFactor;
    out[name] = form.units === 'coded' ? toNatural(f, x[i]!) : x[i]!;
  });
  return out;
}

function evaluate(form: QuadraticForm, x: readonly number[]): number {
  let s = form.constant;
  for (let i = 0; i < x.length; i++) {
    s += form.linear[i]! * x[i]!;
    for (let j = 0; j < x.length; j++) s += x[i]! * form.quadratic[i]![j]! * x[j]!;
  }
  return s;
}

/** Relative size below which an eigenvalue counts as zero for the classification (common practice, no source). */
const RIDGE_RATIO = 0.05;

/** Eigenvalues and directions of B, and what kind of surface they describe. */
export function canonicalAnalysis(form: QuadraticForm): CanonicalAnalysis {
  const evd = new EigenvalueDecomposition(new Matrix(form.quadratic), { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const vectors = evd.eigenvectorMatrix;
  const order = values.map((_, i) => i).sort((a, b) => values[a]! - values[b]!);
  const eigenvalues = order.map((i) => values[i]!);
  const directions = order.map((i) => {
    const v = vectors.getColumn(i);
    // Sign convention: the largest component positive.
    let big = 0;
    for (let j = 1; j < v.length; j++) if (Math.abs(v[j]!) > Math.abs(v[big]!)) big = j;
    return v[big]! < 0 ? v.map((x) => -x) : v;
  });
  const largest = Math.max(...eigenvalues.map(Math.abs));
  let kind: SurfaceKind;
  if (largest === 0 || eigenvalues.some((l) => Math.abs(l) <= RIDGE_RATIO * largest)) kind = 'ridge';
  else if (eigenvalues.every((l) => l < 0)) kind = 'maximum';
  else if (eigenvalues.every((l) => l > 0)) kind = 'minimum';
  else kind = 'saddle';
  return { eigenvalues, directions, kind };
}

/** Stationary point x_s = −½ B⁻¹ b; null when B is singular. */
export function stationaryPoint(result: AnalysisResult, form = quadraticForm(result)): StationaryPoint | null {
  const k = form.factors.length;
  const B = new Matrix(form.quadratic);
  let xs: number[];
  try {
    const sol = solve(B, Matrix.columnVector(form.linear.map((v) => -v / 2)));
    xs = sol.getColumn(0);
  } catch {
    return null;
  }
  if (xs.length !== k || xs.some((v) => !Number.isFinite(v))) return null;
  return { point: xs, natural: toNaturalVector(result, form, xs), predicted: evaluate(form, xs), distance: Math.hypot(...xs) };
}

export interface PathPoint {
  /** Distance from the centre along the path (model units). */
  distance: number;
  point: number[];
  natural: Record<string, number>;
  predicted: number;
}

/**
 * Path of steepest ascent (or descent) from the design centre: along the gradient of the fitted
 * surface, followed in small steps so that curvature bends it; points every `stepSize` units.
 */
export function steepestAscent(result: AnalysisResult, options: { steps?: number; stepSize?: number; direction?: 'ascent' | 'descent'; held?: Point } = {}): PathPoint[] {
  const form = quadraticForm(result, options.held);
  const steps = options.steps ?? 10;
  const stepSize = options.stepSize ?? 0.5;
  const sign = options.direction === 'descent' ? -1 : 1;
  const k = form.factors.length;
  let x = new Array<number>(k).fill(0);
  const out: PathPoint[] = [{ distance: 0, point: x.slice(), natural: toNaturalVector(result, form, x), predicted: evaluate(form, x) }];
  const sub = 50;
  let travelled = 0;
  for (let s = 1; s <= steps; s++) {
    for (let m = 0; m < sub; m++) {
      const g = form.linear.map((bi, i) => bi + 2 * form.quadratic[i]!.reduce((t, bij, j) => t + bij * x[j]!, 0));
      const norm = Math.hypot(...g);
      if (norm === 0) break;
      const h = stepSize / sub;
      x = x.map((xi, i) => xi + (sign * h * g[i]!) / norm);
      travelled += h;
    }
    out.push({ distance: travelled, point: x.slice(), natural: toNaturalVector(result, form, x), predicted: evaluate(form, x) });
  }
  return out;
}

/**
 * Ridge analysis: for each radius R, the point on the sphere ‖x‖ = R with the highest (or lowest)
 * predicted response, x(μ) = −½ (B − μI)⁻¹ b with μ beyond the largest (smallest) eigenvalue.
 */
export function ridgeAnalysis(result: AnalysisResult, options: { radii?: number[]; goal?: 'maximize' | 'minimize'; held?: Point } = {}): PathPoint[] {
  const form = quadraticForm(result, options.held);
  const k = form.factors.length;
  const radii = options.radii ?? Array.from({ length: 11 }, (_, i) => (i * Math.sqrt(k)) / 10);
  const { eigenvalues } = canonicalAnalysis(form);
  const maximize = (options.goal ?? 'maximize') === 'maximize';
  const edge = maximize ? eigenvalues[eigenvalues.length - 1]! : eigenvalues[0]!;
  const pointAt = (mu: number): number[] => {
    const M = new Matrix(form.quadratic.map((r, i) => r.map((v, j) => v - (i === j ? mu : 0))));
    return solve(M, Matrix.columnVector(form.linear.map((v) => -v / 2))).getColumn(0);
  };
  const bNorm = Math.hypot(...form.linear);
  const scale = Math.max(1e-12, Math.abs(edge), bNorm, ...eigenvalues.map(Math.abs));
  return radii.map((R) => {
    let x: number[];
    if (R === 0) x = new Array<number>(k).fill(0);
    else if (bNorm === 0) {
      // No linear part: the ridge runs along the extreme eigenvector.
      const { directions } = canonicalAnalysis(form);
      const d = maximize ? directions[directions.length - 1]! : directions[0]!;
      x = d.map((v) => v * R);
    } else {
      // ‖x(μ)‖ falls monotonically from ∞ to 0 as μ moves away from the edge eigenvalue.
      const dir = maximize ? 1 : -1;
      let near = edge + dir * 1e-12 * scale;
      let far = edge + dir * scale;
      while (Math.hypot(...pointAt(far)) > R) far = edge + 2 * (far - edge);
      if (Math.hypot(...pointAt(near)) < R) near = edge + dir * 1e-15 * scale;
      for (let it = 0; it < 200; it++) {
        const mid = 0.5 * (near + far);
        if (Math.hypot(...pointAt(mid)) > R) near = mid;
        else far = mid;
        if (Math.abs(far - near) <= 1e-14 * Math.abs(mid)) break;
      }
      x = pointAt(0.5 * (near + far));
    }
    return { distance: R, point: x, natural: toNaturalVector(result, form, x), predicted: evaluate(form, x) };
  });
}

export interface ContourGrid {
  factorX: string;
  factorY: string;
  /** Grid coordinates in natural units. */
  x: number[];
  y: number[];
  /** z[j][i]: predicted response at (x[i], y[j]). */
  z: number[][];
  held: Point;
  /** The runs' settings of the two factors (when the result carries its runs). */
  designPoints: { x: number; y: number }[];
}

/** Natural range of a numeric factor for plots: its [low, high]. */
function plotRange(f: Factor): [number, number] {
  if (f.kind === 'categorical') throw invalidInput('factorX', `${f.name} is categorical; contour and slice plots need numeric factors`);
  const { low, high } = numericRange(f);
  return [low, high];
}

function centrePoint(result: AnalysisResult, held?: Point): Point {
  const p: Point = {};
  for (const f of result.factors) {
    if (held && held[f.name] !== undefined) p[f.name] = held[f.name]!;
    else if (f.kind === 'categorical') p[f.name] = f.levels[0]!;
    else {
      const { low, high } = numericRange(f);
      p[f.name] = (low + high) / 2;
    }
  }
  return p;
}

/**
 * Predicted response over an n × n grid of two numeric factors spanning their ranges, the other
 * factors held (numeric at their centre, categorical at their first level, unless given).
 */
export function contourGrid(result: AnalysisResult, factorX: string, factorY: string, held?: Point, n = 41, predict?: (p: Point) => number): ContourGrid {
  const fx = result.factors.find((f) => f.name === factorX);
  const fy = result.factors.find((f) => f.name === factorY);
  if (!fx) throw invalidInput('factorX', `${factorX} is not a factor of this model`);
  if (!fy) throw invalidInput('factorY', `${factorY} is not a factor of this model`);
  if (factorX === factorY) throw invalidInput('factorY', 'choose two different factors');
  if (!(n >= 2 && n <= 501)) throw invalidInput('n', 'grid size must be between 2 and 501');
  const [x0, x1] = plotRange(fx);
  const [y0, y1] = plotRange(fy);
  const xs = Array.from({ length: n }, (_, i) => x0 + ((x1 - x0) * i) / (n - 1));
  const ys = Array.from({ length: n }, (_, j) => y0 + ((y1 - y0) * j) / (n - 1));
  const base = centrePoint(result, held);
  const f = predict ?? surfacePredictor(result);
  const z = ys.map((yv) => xs.map((xv) => f({ ...base, [factorX]: xv, [factorY]: yv })));
  const heldOut: Point = { ...base };
  delete heldOut[factorX];
  delete heldOut[factorY];
  const designPoints = (result.runs ?? []).map((r) => ({ x: Number(r[factorX]), y: Number(r[factorY]) }));
  return { factorX, factorY, x: xs, y: ys, z, held: heldOut, designPoints };
}

/** Predicted response along one factor (a slice), the others held. */
export function sliceData(result: AnalysisResult, factor: string, held?: Point, n = 41): { x: number[]; predicted: number[]; held: Point } {
  const f = result.factors.find((g) => g.name === factor);
  if (!f) throw invalidInput('factor', `${factor} is not a factor of this model`);
  const [a, b] = plotRange(f);
  const base = centrePoint(result, held);
  const pr = surfacePredictor(result);
  const x = Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
  const heldOut: Point = { ...base };
  delete heldOut[factor];
  return { x, predicted: x.map((v) => pr({ ...base, [factor]: v })), held: heldOut };
}

export interface InteractionPlot {
  factorA: string;
  factorB: string;
  /** Levels of A on the horizontal axis (natural values or level labels). */
  levelsA: (number | string)[];
  /** One line per level of B. */
  lines: { levelB: number | string; predicted: number[] }[];
  held: Point;
}

function plotLevels(f: Factor): (number | string)[] {
  if (f.kind === 'categorical') return f.levels.slice();
  const { low, high } = numericRange(f);
  return [low, high];
}

/** Interaction-plot data: predicted response at the levels of A (low/high or each level) for each level of B. */
export function interactionPlot(result: AnalysisResult, factorA: string, factorB: string, held?: Point): InteractionPlot {
  const fa = result.factors.find((f) => f.name === factorA);
  const fb = result.factors.find((f) => f.name === factorB);
  if (!fa) throw invalidInput('factorA', `${factorA} is not a factor of this model`);
  if (!fb) throw invalidInput('factorB', `${factorB} is not a factor of this model`);
  const base = centrePoint(result, held);
  const pr = surfacePredictor(result);
  const levelsA = plotLevels(fa);
  const lines = plotLevels(fb).map((lb) => ({ levelB: lb, predicted: levelsA.map((la) => pr({ ...base, [factorA]: la, [factorB]: lb })) }));
  const heldOut: Point = { ...base };
  delete heldOut[factorA];
  delete heldOut[factorB];
  return { factorA, factorB, levelsA, lines, held: heldOut };
}

/** Predicted mean at a point in natural units, from the coefficients of a gaussian result. */
function surfacePredictor(result: AnalysisResult): (p: Point) => number {
  const factors = result.factors;
  const terms = [...(result.intercept ? [INTERCEPT] : []), ...result.terms.map((t) => parseTerm(t, factors))];
  const model = compileModel(factors, terms);
  const colOf = new Map(model.labels.map((l, j) => [l, j]));
  const beta = new Float64Array(model.p);
  for (const c of result.coefficients) beta[colOf.get(c.term)!] = c.estimate;
  const row = new Float64Array(model.p);
  return (p) => {
    const v = factors.map((f) => {
      const val = p[f.name];
      if (f.kind === 'categorical') return heldLevelIndex(f, { [f.name]: val ?? f.levels[0]! });
      const num = Number(val);
      return result.coding === 'coded' ? (2 * (num - numericRange(f).low)) / (numericRange(f).high - numericRange(f).low) - 1 : num;
    });
    model.row(v, row);
    let s = 0;
    for (let j = 0; j < model.p; j++) s += row[j]! * beta[j]!;
    return s;
  };
}
