/**
 * Optimal designs by coordinate exchange: from many random starts, each coordinate of each run is
 * replaced by the candidate level that most improves the criterion (D: largest |M|; I: smallest
 * average prediction variance trace(W M^-1)), until a full pass changes nothing. Every change is a
 * low-rank update of M^-1, so a trial costs O(p^2). Fixed blocks enter the model as a categorical
 * factor whose level a run keeps; split-plot designs hold hard-to-change factors constant within a
 * whole plot and use M = X' V^-1 X with V = I + η Z Z' (η the whole-plot/sub-plot variance ratio).
 */
// Meyer & Nachtsheim (1995), Technometrics 37:60-69 (coordinate exchange)
// Goos & Vandebroek (2003), Technometrics 45:20-32; Jones & Goos (2007), JRSS C 56:347-364 (split-plot designs)
import { DomainError } from '../errors';
import type { Factor, ModelTerm } from '../factors';
import { seededRandom, type RandomSource } from '../random';
import { cholesky, inverseFromCholesky, logDetFromCholesky } from './linear-algebra';
import { fastModel, type FastModel } from './model-rows';
import { momentMatrix, randomFeasiblePoint, type CodedRegion } from './region';

export type OptimalityCriterion = 'D' | 'I';

export interface OptimalProblem {
  /** Factors of the coded vectors (may end with a block pseudo-factor). */
  factors: readonly Factor[];
  terms: readonly ModelTerm[];
  region: CodedRegion;
  /** Number of runs to choose. */
  runs: number;
  /** Coded rows already made; they stay as they are and count in M. */
  existing?: readonly (readonly number[])[];
  /** Candidate coded levels per factor (coordinate exchange tries these plus constraint boundaries). */
  levels: readonly (readonly number[])[];
  /** Indices of factors that are never exchanged (e.g. the block). */
  fixedFactors?: readonly number[];
  /** Fixed coordinate values per new run (e.g. its block), factor index → value. */
  fixedValues?: readonly ReadonlyMap<number, number>[];
  /**
   * Split plot: hard-to-change factor indices, and the whole plot of each new run (0-based). A
   * grouping with no whole-plot factors is a set of random blocks.
   */
  wholePlotFactors?: readonly number[];
  wholePlotOf?: readonly number[];
  /** η = σ²(whole plot) / σ²(sub-plot); default 1. */
  varianceRatio?: number;
}

export interface OptimalSearchOptions {
  criterion?: OptimalityCriterion;
  /** Random starts (default 20). */
  starts?: number;
  seed?: number;
  maxPasses?: number;
  /** Called after each start with the fraction of starts done and the best design so far. */
  onProgress?: (fraction: number, detail: OptimalProgress) => void;
  /** Checked between starts and passes; when true the best design so far is returned. */
  shouldStop?: () => boolean;
}

export interface OptimalProgress {
  startsCompleted: number;
  starts: number;
  criterion: OptimalityCriterion;
  /** Best so far: |M / N|^(1/p) for D (the D-efficiency of the diagnostics without whole plots); trace(W M^-1) for I. */
  best: number | null;
}

export interface OptimalSearchResult {
  /** Coded new runs. */
  coded: number[][];
  criterion: OptimalityCriterion;
  /** log |M| for D; trace(W M^-1) for I. */
  value: number;
  logDet: number;
  startsCompleted: number;
  stopped: boolean;
}

/** Default number of random starts (common practice, no source). */
export const DEFAULT_STARTS = 20;

class ExchangeState {
  readonly p: number;
  readonly n: number;
  readonly rows: Float64Array;
  readonly minv: Float64Array;
  logDet = 0;
  iTrace = 0;
  ridge = 0;
  /** Bumped whenever M^-1 changes; lets a run's M^-1 x be reused across its coordinates. */
  version = 0;
  readonly plotSums: Float64Array[];
  readonly plotWeight: number[];

  constructor(
    readonly problem: OptimalProblem,
    readonly model: FastModel,
    readonly w: Float64Array | null,
    readonly existingRows: Float64Array,
    readonly coded: number[][],
    readonly plotOf: readonly number[] | null,
    plotSizes: readonly number[],
    eta: number,
  ) {
    this.p = model.p;
    this.n = coded.length;
    this.rows = new Float64Array(this.n * this.p);
    this.minv = new Float64Array(this.p * this.p);
    coded.forEach((c, i) => model.row(c, this.rows.subarray(i * this.p, (i + 1) * this.p)));
    this.plotSums = plotSizes.map(() => new Float64Array(this.p));
    this.plotWeight = plotSizes.map((m) => eta / (1 + m * eta));
    this.recomputeSums();
  }

  recomputeSums() {
    if (!this.plotOf) return;
    for (const s of this.plotSums) s.fill(0);
    const p = this.p;
    for (let i = 0; i < this.n; i++) {
      const s = this.plotSums[this.plotOf[i]!]!;
      for (let a = 0; a < p; a++) s[a]! += this.rows[i * p + a]!;
    }
  }

  /** M = Σ x x' − Σ c_w s_w s_w' over new runs, plus Σ x x' over existing runs. */
  information(rows: Float64Array = this.rows, sums: Float64Array[] = this.plotSums): Float64Array {
    const p = this.p;
    const m = new Float64Array(p * p);
    const add = (x: Float64Array, off: number, c: number) => {
      for (let a = 0; a < p; a++) {
        const xa = x[off + a]! * c;
        if (xa === 0) continue;
        for (let b = a; b < p; b++) m[a * p + b]! += xa * x[off + b]!;
      }
    };
    for (let i = 0; i * p < this.existingRows.length; i++) add(this.existingRows, i * p, 1);
    for (let i = 0; i < this.n; i++) add(rows, i * p, 1);
    if (this.plotOf) sums.forEach((s, wi) => add(s, 0, -this.plotWeight[wi]!));
    for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) m[a * p + b] = m[b * p + a]!;
    return m;
  }

  /** Recompute M^-1, log|M| and trace(W M^-1) from scratch (with a tiny ridge if M is singular). */
  refresh(): void {
    const p = this.p;
    const m = this.information();
    let l = cholesky(m, p);
    this.ridge = 0;
    if (!l) {
      let tr = 0;
      for (let a = 0; a < p; a++) tr += m[a * p + a]!;
      this.ridge = 1e-6 * Math.max(1, tr / p);
      for (let a = 0; a < p; a++) m[a * p + a]! += this.ridge;
      l = cholesky(m, p);
      if (!l) throw new DomainError('singular_design', 'the design information matrix could not be factored', 'model');
    }
    this.minv.set(inverseFromCholesky(l, p));
    this.version++;
    this.logDet = logDetFromCholesky(l, p);
    if (this.w) this.iTrace = traceProduct(this.w, this.minv, p);
  }
}

function traceProduct(a: Float64Array, b: Float64Array, p: number): number {
  let s = 0;
  for (let i = 0; i < p * p; i++) s += a[i]! * b[i]!; // both symmetric: tr(AB) = Σ a_ij b_ij
  return s;
}

function matVec(m: Float64Array, x: ArrayLike<number>, p: number, out: Float64Array): Float64Array {
  for (let a = 0; a < p; a++) {
    let s = 0;
    const o = a * p;
    for (let b = 0; b < p; b++) s += m[o + b]! * x[b]!;
    out[a] = s;
  }
  return out;
}

function dot(x: ArrayLike<number>, y: ArrayLike<number>, p: number): number {
  let s = 0;
  for (let a = 0; a < p; a++) s += x[a]! * y[a]!;
  return s;
}

/** Determinant and inverse of a small r × r matrix (r ≤ 4) by Gaussian elimination with pivoting. */
function smallDetInverse(k: number[], r: number): { det: number; inv: number[] } | null {
  const a = k.slice();
  const inv = new Array<number>(r * r).fill(0);
  for (let i = 0; i < r; i++) inv[i * r + i] = 1;
  let det = 1;
  for (let c = 0; c < r; c++) {
    let piv = c;
    for (let i = c + 1; i < r; i++) if (Math.abs(a[i * r + c]!) > Math.abs(a[piv * r + c]!)) piv = i;
    const pv = a[piv * r + c]!;
    if (Math.abs(pv) < 1e-300) return null;
    if (piv !== c) {
      for (let j = 0; j < r; j++) {
        [a[c * r + j], a[piv * r + j]] = [a[piv * r + j]!, a[c * r + j]!];
        [inv[c * r + j], inv[piv * r + j]] = [inv[piv * r + j]!, inv[c * r + j]!];
      }
      det = -det;
    }
    det *= pv;
    for (let j = 0; j < r; j++) {
      a[c * r + j]! /= pv;
      inv[c * r + j]! /= pv;
    }
    for (let i = 0; i < r; i++) {
      if (i === c) continue;
      const f = a[i * r + c]!;
      if (f === 0) continue;
      for (let j = 0; j < r; j++) {
        a[i * r + j]! -= f * a[c * r + j]!;
        inv[i * r + j]! -= f * inv[c * r + j]!;
      }
    }
  }
  return { det, inv };
}

/** Run the coordinate-exchange search. */
export function coordinateExchange(problem: OptimalProblem, options: OptimalSearchOptions = {}): OptimalSearchResult {
  const criterion = options.criterion ?? 'D';
  const starts = options.starts ?? DEFAULT_STARTS;
  const maxPasses = options.maxPasses ?? 25;
  const master = seededRandom(options.seed ?? 1);
  const model = fastModel(problem.factors, problem.terms);
  const p = model.p;
  const w = criterion === 'I' ? momentMatrix(problem.region, problem.terms, seededRandom((options.seed ?? 1) + 7919)) : null;
  const existing = problem.existing ?? [];
  const existingRows = new Float64Array(existing.length * p);
  existing.forEach((c, i) => model.row(c, existingRows.subarray(i * p, (i + 1) * p)));
  const eta = problem.varianceRatio ?? 1;
  // Whole plots with no hard-to-change factor are random blocks: they change M, not the exchanges.
  const plotOf = problem.wholePlotOf ?? null;
  const plotCount = plotOf ? Math.max(...plotOf) + 1 : 0;
  const plotSizes = Array.from({ length: plotCount }, (_, wi) => plotOf!.filter((q) => q === wi).length);
  const plotMembers = Array.from({ length: plotCount }, (_, wi) => plotOf!.map((q, i) => (q === wi ? i : -1)).filter((i) => i >= 0));
  const wpFactors = new Set(plotOf ? problem.wholePlotFactors : []);
  const fixed = new Set(problem.fixedFactors ?? []);
  const exchangeable = problem.factors.map((_, j) => j).filter((j) => !fixed.has(j) && !wpFactors.has(j));

  let best: OptimalSearchResult | null = null;
  let completed = 0;
  let stopped = false;
  for (let s = 0; s < starts; s++) {
    if (options.shouldStop?.()) {
      stopped = true;
      break;
    }
    const rng = seededRandom(Math.floor(master.next() * 2 ** 31));
    const start = randomStart(problem, rng, plotMembers, wpFactors);
    if (!start) throw new DomainError('infeasible', 'no feasible starting design was found; check the constraints against the factor ranges', 'constraints');
    const st = new ExchangeState(problem, model, w, existingRows, start, plotOf, plotSizes, eta);
    st.refresh();
    for (let pass = 0; pass < maxPasses; pass++) {
      let changed = false;
      if (plotOf) for (let wi = 0; wi < plotCount; wi++) for (const j of wpFactors) if (wholePlotExchange(st, wi, j, plotMembers[wi]!, criterion)) changed = true;
      for (let i = 0; i < st.n; i++) for (const j of exchangeable) if (runExchange(st, i, j, criterion)) changed = true;
      st.refresh();
      if (!changed || options.shouldStop?.()) break;
    }
    completed++;
    const value = criterion === 'D' ? st.logDet : st.iTrace;
    const valid = st.ridge === 0;
    const better =
      best === null ||
      (valid && best.logDet === -Infinity) ||
      (valid && (criterion === 'D' ? value > best.value + 1e-10 : value < best.value - 1e-10));
    if (better) {
      best = { coded: st.coded.map((c) => c.slice()), criterion, value: valid ? value : criterion === 'D' ? -Infinity : Infinity, logDet: valid ? st.logDet : -Infinity, startsCompleted: 0, stopped: false };
    }
    if (options.onProgress) {
      const total = st.n + existing.length;
      const finite = best !== null && Number.isFinite(best.value);
      const shown = !finite ? null : criterion === 'D' ? Math.exp(best!.logDet / p) / total : best!.value;
      options.onProgress(completed / starts, { startsCompleted: completed, starts, criterion, best: shown });
    }
  }
  if (!best) throw new DomainError('unsupported', 'the search was stopped before the first start finished', 'starts');
  return { ...best, startsCompleted: completed, stopped };
}

function randomStart(problem: OptimalProblem, rng: RandomSource, plotMembers: number[][], wpFactors: Set<number>): number[][] | null {
  const n = problem.runs;
  const out: (number[] | null)[] = new Array(n).fill(null);
  const fixedFor = (i: number) => new Map(problem.fixedValues?.[i] ?? []);
  if (plotMembers.length > 0) {
    for (const members of plotMembers) {
      let ok = false;
      for (let attempt = 0; attempt < 50 && !ok; attempt++) {
        const wp = new Map<number, number>();
        for (const j of wpFactors) wp.set(j, problem.levels[j]![Math.floor(rng.next() * problem.levels[j]!.length)]!);
        ok = true;
        for (const i of members) {
          const fx = fixedFor(i);
          for (const [j, v] of wp) fx.set(j, v);
          const x = randomFeasiblePoint(problem.region, problem.levels, rng, fx);
          if (!x) {
            ok = false;
            break;
          }
          out[i] = x;
        }
      }
      if (!ok) return null;
    }
  }
  for (let i = 0; i < n; i++) {
    if (out[i]) continue;
    const x = randomFeasiblePoint(problem.region, problem.levels, rng, fixedFor(i));
    if (!x) return null;
    out[i] = x;
  }
  return out as number[][];
}

// Scratch buffers reused across trials (the search is single-threaded).
const zxOwner: { state: ExchangeState | null; run: number; version: number } = { state: null, run: -1, version: -1 };
let scratchP = 0;
let zx: Float64Array, zs: Float64Array, znew: Float64Array, xnew: Float64Array, snew: Float64Array, zsnew: Float64Array, wz: Float64Array[];
let diffIndex: Int32Array, diffValue: Float64Array;
function scratch(p: number) {
  if (scratchP === p) return;
  scratchP = p;
  zxOwner.state = null;
  zx = new Float64Array(p);
  zs = new Float64Array(p);
  znew = new Float64Array(p);
  xnew = new Float64Array(p);
  snew = new Float64Array(p);
  zsnew = new Float64Array(p);
  wz = [0, 1, 2, 3].map(() => new Float64Array(p));
  diffIndex = new Int32Array(p);
  diffValue = new Float64Array(p);
}

const kScratch = new Array<number>(16).fill(0);


/**
 * Try every candidate level of factor j in run i; apply the best improving change. Changing one
 * coordinate changes only the model columns that involve that factor, so M^-1 x' = M^-1 x + M^-1 d
 * with d = x' − x sparse.
 */
function runExchange(st: ExchangeState, i: number, j: number, criterion: OptimalityCriterion): boolean {
  const { p, minv, problem, model } = st;
  scratch(p);
  const coded = st.coded[i]!;
  const current = coded[j]!;
  const x = st.rows.subarray(i * p, (i + 1) * p);
  if (zxOwner.state !== st || zxOwner.run !== i || zxOwner.version !== st.version) {
    matVec(minv, x, p, zx);
    zxOwner.state = st;
    zxOwner.run = i;
    zxOwner.version = st.version;
  }
  const plot = st.plotOf ? st.plotOf[i]! : -1;
  const c = plot >= 0 ? st.plotWeight[plot]! : 0;
  const split = plot >= 0 && c > 0;
  const s = split ? st.plotSums[plot]! : null;
  if (s) matVec(minv, s, p, zs);
  const r = split ? 4 : 2;
  const cdiag = split ? [1, -1, -c, c] : [1, -1];
  const levels = problem.levels[j]!;
  const boundary = problem.region.boundaryValues(coded, j);
  const candidates = boundary.length ? [...new Set([...levels, ...boundary])] : levels;
  let bestGain = 0;
  let bestLevel = current;
  let bestUpdate: { z: Float64Array[]; kinvC: number[]; logDet: number; trace: number; xnew: Float64Array } | null = null;
  const wx = st.w ? matVec(st.w, zx, p, new Float64Array(p)) : null;
  const ws = st.w && s ? matVec(st.w, zs, p, new Float64Array(p)) : null;
  const us: Float64Array[] = s ? [xnew, x, snew, s] : [xnew, x];
  const zs4: Float64Array[] = s ? [znew, zx, zsnew, zs] : [znew, zx];
  const k = kScratch;
  const touched = model.columnsOf[j]!;
  const fastD = criterion === 'D' && !s;
  const dxx = fastD ? dot(x, zx, p) : 0;
  let fastBest: { det: number; xnew: Float64Array; index: Int32Array; value: Float64Array } | null = null;
  for (const level of candidates) {
    if (Math.abs(level - current) < 1e-12) continue;
    coded[j] = level;
    const feasible = problem.region.feasible(coded);
    let nz = 0;
    if (feasible) {
      xnew.set(x);
      for (let t = 0; t < touched.length; t++) {
        const a = touched[t]!;
        const v = model.column(a, coded);
        xnew[a] = v;
        const dv = v - x[a]!;
        if (dv !== 0) {
          diffIndex[nz] = a;
          diffValue[nz++] = dv;
        }
      }
    }
    coded[j] = current;
    if (nz === 0) continue;
    if (fastD) {
      // Fedorov's delta with d = x' − x sparse: only M^-1 entries among the changed columns are read.
      let a1 = 0;
      let b1 = 0;
      for (let t = 0; t < nz; t++) {
        const ct = diffIndex[t]!;
        const dt = diffValue[t]!;
        a1 += dt * zx[ct]!;
        const o = ct * p;
        let row = 0;
        for (let u = 0; u < nz; u++) row += minv[o + diffIndex[u]!]! * diffValue[u]!;
        b1 += dt * row;
      }
      const g00 = dxx + 2 * a1 + b1;
      const g01 = dxx + a1;
      const det = (1 + g00) * (1 - dxx) + g01 * g01;
      if (!(det > 0)) continue;
      const gain = Math.log(det);
      if (gain > bestGain + 1e-9) {
        bestGain = gain;
        bestLevel = level;
        fastBest = { det, xnew: Float64Array.from(xnew), index: diffIndex.slice(0, nz), value: diffValue.slice(0, nz) };
      }
      continue;
    }
    znew.set(zx);
    for (let t = 0; t < nz; t++) {
      const o = diffIndex[t]! * p;
      const dv = diffValue[t]!;
      for (let a = 0; a < p; a++) znew[a]! += minv[o + a]! * dv;
    }
    if (s) {
      for (let a = 0; a < p; a++) {
        snew[a] = s[a]! + xnew[a]! - x[a]!;
        zsnew[a] = zs[a]! + znew[a]! - zx[a]!;
      }
    }
    // K = I + C G with G = U' M^-1 U.
    for (let a = 0; a < r; a++) for (let b = 0; b < r; b++) k[a * r + b] = (a === b ? 1 : 0) + cdiag[a]! * dot(us[a]!, zs4[b]!, p);
    let det: number;
    let inv: number[] | null = null;
    if (r === 2) {
      det = k[0]! * k[3]! - k[1]! * k[2]!;
    } else {
      const di = smallDetInverse(k.slice(0, 16), r);
      if (!di) continue;
      det = di.det;
      inv = di.inv;
    }
    if (!(det > 0)) continue;
    let gain: number;
    let trace = st.iTrace;
    if (criterion === 'D') {
      gain = Math.log(det);
      if (!(gain > bestGain + 1e-9)) continue;
    }
    if (!inv) inv = [k[3]! / det, -k[1]! / det, -k[2]! / det, k[0]! / det];
    // K^-1 C, used by the update of M^-1 and of the trace.
    const kinvC = new Array<number>(r * r);
    for (let a = 0; a < r; a++) for (let b = 0; b < r; b++) kinvC[a * r + b] = inv[a * r + b]! * cdiag[b]!;
    if (criterion === 'D') {
      gain = Math.log(det);
    } else {
      // trace(W M'^-1) = trace(W M^-1) − trace(K^-1 C Z' W Z).
      const wzs: Float64Array[] = [matVec(st.w!, znew, p, wz[0]!), wx!];
      if (s) {
        const w2 = wz[2]!;
        for (let a = 0; a < p; a++) w2[a] = ws![a]! + wz[0]![a]! - wx![a]!;
        wzs.push(w2, ws!);
      }
      let delta = 0;
      for (let a = 0; a < r; a++) for (let b = 0; b < r; b++) delta += kinvC[a * r + b]! * dot(zs4[b]!, wzs[a]!, p);
      trace = st.iTrace - delta;
      gain = (st.iTrace - trace) / Math.max(st.iTrace, 1e-300);
    }
    if (gain > bestGain + 1e-9) {
      bestGain = gain;
      bestLevel = level;
      bestUpdate = { z: zs4.map((z) => Float64Array.from(z)), kinvC, logDet: st.logDet + Math.log(det), trace, xnew: Float64Array.from(xnew) };
    }
  }
  if (fastBest) {
    // The winning change as a rank-two update: Z = [M^-1 x', M^-1 x], K from the same G.
    znew.set(zx);
    for (let t = 0; t < fastBest.index.length; t++) {
      const o = fastBest.index[t]! * p;
      const dv = fastBest.value[t]!;
      for (let a = 0; a < p; a++) znew[a]! += minv[o + a]! * dv;
    }
    const g00 = dot(fastBest.xnew, znew, p);
    const g01 = dot(fastBest.xnew, zx, p);
    const k0 = [1 + g00, g01, -g01, 1 - dxx];
    const det = k0[0]! * k0[3]! - k0[1]! * k0[2]!;
    const inv = [k0[3]! / det, -k0[1]! / det, -k0[2]! / det, k0[0]! / det];
    bestUpdate = {
      z: [Float64Array.from(znew), Float64Array.from(zx)],
      kinvC: [inv[0]!, -inv[1]!, inv[2]!, -inv[3]!],
      logDet: st.logDet + Math.log(det),
      trace: st.iTrace,
      xnew: fastBest.xnew,
    };
  }
  if (!bestUpdate) return false;
  // M^-1 ← M^-1 − Z K^-1 C Z'.
  const { z, kinvC } = bestUpdate;
  for (let a = 0; a < p; a++) {
    for (let b = a; b < p; b++) {
      let d = 0;
      for (let u = 0; u < r; u++) {
        const za = z[u]![a]!;
        if (za === 0) continue;
        for (let v = 0; v < r; v++) d += za * kinvC[u * r + v]! * z[v]![b]!;
      }
      minv[a * p + b]! -= d;
      if (a !== b) minv[b * p + a] = minv[a * p + b]!;
    }
  }
  st.version++;
  st.logDet = bestUpdate.logDet;
  st.iTrace = bestUpdate.trace;
  if (s) for (let a = 0; a < p; a++) s[a]! += bestUpdate.xnew[a]! - x[a]!;
  x.set(bestUpdate.xnew);
  coded[j] = bestLevel;
  return true;
}

/** Try every level of hard-to-change factor j for whole plot wi (all its runs move together). */
function wholePlotExchange(st: ExchangeState, wi: number, j: number, members: readonly number[], criterion: OptimalityCriterion): boolean {
  const { p, problem, model } = st;
  const current = st.coded[members[0]!]![j]!;
  const worst = criterion === 'D' ? -Infinity : Infinity;
  let bestValue = st.ridge > 0 ? worst : criterion === 'D' ? st.logDet : st.iTrace;
  let bestLevel = current;
  const trialRows = Float64Array.from(st.rows);
  const trialSums = st.plotSums.map((s) => Float64Array.from(s));
  for (const level of problem.levels[j]!) {
    if (Math.abs(level - current) < 1e-12) continue;
    let feasible = true;
    for (const i of members) {
      const c = st.coded[i]!.slice();
      c[j] = level;
      if (!problem.region.feasible(c)) {
        feasible = false;
        break;
      }
      model.row(c, trialRows.subarray(i * p, (i + 1) * p));
    }
    if (!feasible) {
      for (const i of members) trialRows.set(st.rows.subarray(i * p, (i + 1) * p), i * p);
      continue;
    }
    const sum = trialSums[wi]!.fill(0);
    for (const i of members) for (let a = 0; a < p; a++) sum[a]! += trialRows[i * p + a]!;
    const m = st.information(trialRows, trialSums);
    const l = cholesky(m, p);
    if (l) {
      const value = criterion === 'D' ? logDetFromCholesky(l, p) : traceProduct(st.w!, inverseFromCholesky(l, p), p);
      const better = !Number.isFinite(bestValue) || (criterion === 'D' ? value > bestValue + 1e-9 * Math.max(1, Math.abs(bestValue)) : value < bestValue * (1 - 1e-9));
      if (better) {
        bestValue = value;
        bestLevel = level;
      }
    }
    for (const i of members) trialRows.set(st.rows.subarray(i * p, (i + 1) * p), i * p);
    trialSums[wi]!.set(st.plotSums[wi]!);
  }
  if (bestLevel === current) return false;
  for (const i of members) {
    st.coded[i]![j] = bestLevel;
    model.row(st.coded[i]!, st.rows.subarray(i * p, (i + 1) * p));
  }
  st.recomputeSums();
  st.refresh();
  return true;
}
