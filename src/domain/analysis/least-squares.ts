/**
 * Linear least squares by Householder QR with column pivoting and rank detection; never the normal
 * equations. Columns are scaled by powers of two (exact) before factorising, and the solution is
 * improved by iterative refinement of the augmented system with residuals computed in about twice
 * the working precision, which brings ill-conditioned polynomial fits to full accuracy.
 */
// Businger & Golub (1965), Numer. Math. 7:269-276 (Householder QR with column pivoting)
// Björck (1967), BIT 7:257-278 (iterative refinement of linear least squares via the augmented system)
// Björck (1987), Linear Algebra Appl. 88/89:31-48 (corrected semi-normal equations)
import { dot2 } from './compensated';
import { largeColumnArray, largeTriangle } from './tall-qr';

export interface LeastSquaresOptions {
  /** A column whose part not explained by the columns before it is at or below rankTolerance of its norm is aliased. */
  rankTolerance?: number;
  /** Refinement steps for the coefficients (default: 3 when ill-conditioned, else 1 up to n·p = 200,000 and 0 beyond; 0 turns refinement off). */
  refinementSteps?: number;
  /**
   * Refine the unscaled covariance (X'X)⁻¹ as well: 'auto' (default) does so when the scaled
   * condition estimate exceeds 1e4, true always, false never.
   */
  refineCovariance?: boolean | 'auto';
  /**
   * Low-order parts of X (column-major, same shape), when X's entries are products that double
   * precision rounds (e.g. x^10): X + xLow is then the matrix refinement solves for.
   */
  xLow?: Float64Array | null | (() => Float64Array | null);
}

/** Scaled condition estimate above which the covariance is refined and low-order parts are used. */
const ILL_CONDITIONED = 1e4;

export interface LeastSquaresFit {
  n: number;
  p: number;
  rank: number;
  /** Estimates for all p columns; NaN for aliased (inestimable) columns. */
  coefficients: Float64Array;
  /** Estimable columns (original indices, ascending) and aliased ones. */
  basis: number[];
  aliased: number[];
  /** (X_bᵀX_b)⁻¹ over the basis columns, row-major rank × rank, in the order of `basis`. */
  unscaledCovariance: Float64Array;
  fitted: Float64Array;
  residuals: Float64Array;
  /** Σ residual², accumulated with compensation. */
  residualSumOfSquares: number;
  /** |R_00| / |R_rr| on scaled columns: a lower bound of the scaled condition number. */
  conditionEstimate: number;
  /**
   * How R was found: 'row-chunks' (the triangle of [X y] chunk by chunk, for large well-conditioned
   * problems that need no refinement) or 'whole-matrix' (reflectors of X kept, refinement possible).
   */
  factorisation?: 'row-chunks' | 'whole-matrix';
}

/** A Householder QR factorisation of a column-scaled, column-pivoted matrix (column-major). */
export interface PivotedQr {
  n: number;
  p: number;
  /** Householder vectors below the diagonal (with v_k[0] stored in `v0`), R above it. */
  a: Float64Array;
  v0: Float64Array;
  beta: Float64Array;
  diag: Float64Array;
  /** pivot[k] = original column in position k. */
  pivot: Int32Array;
  /** Power-of-two scale of each original column. */
  scale: Float64Array;
  rank: number;
}

/** Column-major copy of a row-major n × p matrix. */
export function toColumnMajor(rowMajor: ArrayLike<number>, n: number, p: number): Float64Array {
  const out = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    const r = i * p;
    for (let j = 0; j < p; j++) out[j * n + i] = rowMajor[r + j]!;
  }
  return out;
}

function powerOfTwoNear(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 1;
  return Math.pow(2, Math.round(Math.log2(x)));
}

/** Householder QR with column pivoting of X (column-major n × p). X is not modified. */
export function pivotedQr(x: Float64Array, n: number, p: number, rankTolerance?: number): PivotedQr {
  const a = new Float64Array(x);
  const scale = new Float64Array(p);
  const norms = new Float64Array(p);
  const original = new Float64Array(p);
  const pivot = new Int32Array(p);
  for (let j = 0; j < p; j++) {
    pivot[j] = j;
    let ss = 0;
    const off = j * n;
    for (let i = 0; i < n; i++) ss += a[off + i]! * a[off + i]!;
    const s = powerOfTwoNear(Math.sqrt(ss));
    scale[j] = s;
    const inv = 1 / s;
    let ss2 = 0;
    for (let i = 0; i < n; i++) {
      const v = a[off + i]! * inv;
      a[off + i] = v;
      ss2 += v * v;
    }
    norms[j] = Math.sqrt(ss2);
    original[j] = norms[j]!;
  }
  const colNorm = Float64Array.from(norms);
  const m = Math.min(n, p);
  const v0 = new Float64Array(m);
  const beta = new Float64Array(m);
  const diag = new Float64Array(m);
  const tol = rankTolerance ?? Math.max(n, p) * 1e-15;
  const sqrtEps = Math.sqrt(2.220446049250313e-16);
  let rank = 0;
  for (let k = 0; k < m; k++) {
    // Pivot: the column with the largest share of its norm not yet explained by the columns chosen
    // (a scale-free choice); ties (within 1e-10) go to the earliest position, so in a design with
    // orthogonal columns the term order is kept and aliased columns later in the list are dropped.
    let best = k;
    let bestShare = colNorm[k]! > 0 ? norms[k]! / colNorm[k]! : 0;
    for (let j = k + 1; j < p; j++) {
      const share = colNorm[j]! > 0 ? norms[j]! / colNorm[j]! : 0;
      if (share > bestShare * (1 + 1e-10)) { best = j; bestShare = share; }
    }
    if (best !== k) {
      const ok = k * n;
      const ob = best * n;
      for (let i = 0; i < n; i++) { const t = a[ok + i]!; a[ok + i] = a[ob + i]!; a[ob + i] = t; }
      let t = norms[k]!; norms[k] = norms[best]!; norms[best] = t;
      t = original[k]!; original[k] = original[best]!; original[best] = t;
      t = colNorm[k]!; colNorm[k] = colNorm[best]!; colNorm[best] = t;
      const pt = pivot[k]!; pivot[k] = pivot[best]!; pivot[best] = pt;
    }
    const off = k * n;
    let ss = 0;
    for (let i = k; i < n; i++) ss += a[off + i]! * a[off + i]!;
    const xnorm = Math.sqrt(ss);
    if (xnorm === 0 || xnorm <= tol * colNorm[k]!) break;
    const x0 = a[off + k]!;
    const alpha = x0 >= 0 ? -xnorm : xnorm;
    const v0k = x0 - alpha;
    const b = -1 / (alpha * v0k);
    v0[k] = v0k;
    beta[k] = b;
    diag[k] = alpha;
    a[off + k] = v0k;
    // Apply the reflector to the trailing columns, four at a time so v is read once per four.
    let j0 = k + 1;
    for (; j0 + 3 < p; j0 += 4) {
      const o0 = j0 * n;
      const o1 = o0 + n;
      const o2 = o1 + n;
      const o3 = o2 + n;
      let w0 = 0;
      let w1 = 0;
      let w2 = 0;
      let w3 = 0;
      for (let i = k; i < n; i++) {
        const v = a[off + i]!;
        w0 += v * a[o0 + i]!;
        w1 += v * a[o1 + i]!;
        w2 += v * a[o2 + i]!;
        w3 += v * a[o3 + i]!;
      }
      w0 *= b;
      w1 *= b;
      w2 *= b;
      w3 *= b;
      for (let i = k; i < n; i++) {
        const v = a[off + i]!;
        a[o0 + i] -= w0 * v;
        a[o1 + i] -= w1 * v;
        a[o2 + i] -= w2 * v;
        a[o3 + i] -= w3 * v;
      }
    }
    for (let j = j0; j < p; j++) {
      const oj = j * n;
      let w = 0;
      for (let i = k; i < n; i++) w += a[off + i]! * a[oj + i]!;
      w *= b;
      if (w !== 0) for (let i = k; i < n; i++) a[oj + i] -= w * a[off + i]!;
    }
    for (let j = k + 1; j < p; j++) {
      const oj = j * n;
      // Downdate the partial norm; recompute when cancellation makes it unreliable (as LAPACK's xGEQP3).
      const nj = norms[j]!;
      if (nj !== 0) {
        const ratio = Math.abs(a[oj + k]!) / nj;
        const temp = Math.max(0, (1 + ratio) * (1 - ratio));
        const rel = nj / original[j]!;
        if (temp * rel * rel <= sqrtEps) {
          let s2 = 0;
          for (let i = k + 1; i < n; i++) s2 += a[oj + i]! * a[oj + i]!;
          norms[j] = Math.sqrt(s2);
          original[j] = norms[j]!;
        } else {
          norms[j] = nj * Math.sqrt(temp);
        }
      }
    }
    rank = k + 1;
  }
  return { n, p, a, v0, beta, diag, pivot, scale, rank };
}

/** Apply Qᵀ (first `rank` reflectors) to vector y in place. */
function applyQt(qr: PivotedQr, y: Float64Array): void {
  const { n, a, beta, rank } = qr;
  for (let k = 0; k < rank; k++) {
    const off = k * n;
    let w = 0;
    for (let i = k; i < n; i++) w += a[off + i]! * y[i]!;
    w *= beta[k]!;
    if (w !== 0) for (let i = k; i < n; i++) y[i] -= w * a[off + i]!;
  }
}

/** Apply Q (first `rank` reflectors) to vector y in place. */
function applyQ(qr: PivotedQr, y: Float64Array): void {
  const { n, a, beta, rank } = qr;
  for (let k = rank - 1; k >= 0; k--) {
    const off = k * n;
    let w = 0;
    for (let i = k; i < n; i++) w += a[off + i]! * y[i]!;
    w *= beta[k]!;
    if (w !== 0) for (let i = k; i < n; i++) y[i] -= w * a[off + i]!;
  }
}

/** R entry (row i ≤ col j < rank) of the factorisation. */
function rAt(qr: PivotedQr, i: number, j: number): number {
  return i === j ? qr.diag[i]! : qr.a[j * qr.n + i]!;
}

/** Solve R z = c (upper-triangular, rank × rank) in place. */
function solveR(qr: PivotedQr, c: Float64Array): void {
  const r = qr.rank;
  for (let i = r - 1; i >= 0; i--) {
    let s = c[i]!;
    for (let j = i + 1; j < r; j++) s -= rAt(qr, i, j) * c[j]!;
    c[i] = s / qr.diag[i]!;
  }
}

/** Solve Rᵀ h = g in place. */
function solveRt(qr: PivotedQr, g: Float64Array): void {
  const r = qr.rank;
  for (let i = 0; i < r; i++) {
    let s = g[i]!;
    for (let j = 0; j < i; j++) s -= rAt(qr, j, i) * g[j]!;
    g[i] = s / qr.diag[i]!;
  }
}

/**
 * Scaled basis matrix Z (column-major n × rank): column k is original column pivot[k] divided by
 * its power-of-two scale (exact).
 */
function scaledBasis(x: Float64Array, qr: PivotedQr): Float64Array {
  // (x may be the low-order parts; the power-of-two scale keeps both exact)
  const { n, rank, pivot, scale } = qr;
  const z = new Float64Array(n * rank);
  for (let k = 0; k < rank; k++) {
    const src = pivot[k]! * n;
    const inv = 1 / scale[pivot[k]!]!;
    for (let i = 0; i < n; i++) z[k * n + i] = x[src + i]! * inv;
  }
  return z;
}

const rowScratch = { vals: new Float64Array(0), coefs: new Float64Array(0) };

/** rhs − rOld − (Z + zLow)_i · c for row i, in about twice the working precision. */
function residualRow(z: Float64Array, zLow: Float64Array | null, n: number, rank: number, i: number, c: Float64Array, rhs: number, rOld: number): number {
  const len = (zLow ? 2 * rank : rank) + 2;
  if (rowScratch.vals.length < len) {
    rowScratch.vals = new Float64Array(len);
    rowScratch.coefs = new Float64Array(len);
  }
  const { vals, coefs } = rowScratch;
  let m = 0;
  for (let k = 0; k < rank; k++) { vals[m] = z[k * n + i]!; coefs[m++] = -c[k]!; }
  if (zLow) for (let k = 0; k < rank; k++) { vals[m] = zLow[k * n + i]!; coefs[m++] = -c[k]!; }
  vals[m] = 1; coefs[m++] = -rOld;
  vals[m] = 1; coefs[m++] = rhs;
  return dot2(vals, 0, 1, coefs, 0, m);
}

/**
 * One refinement step of the augmented system [I Z; Zᵀ 0][r; c] = [rhsTop; rhsBottom]: residuals of
 * both block equations in extended precision, correction by the QR factors, added in place.
 */
function refineAugmented(qr: PivotedQr, z: Float64Array, zLow: Float64Array | null, r: Float64Array, c: Float64Array, rhsTop: Float64Array | null, rhsBottom: Float64Array | null): void {
  const { n, rank } = qr;
  // f = rhsTop − r − Z c, computed row by row with a compensated dot product.
  const f = new Float64Array(n);
  for (let i = 0; i < n; i++) f[i] = residualRow(z, zLow, n, rank, i, c, rhsTop ? rhsTop[i]! : 0, r[i]!);
  // g = rhsBottom − Zᵀ r
  const g = new Float64Array(rank);
  for (let k = 0; k < rank; k++) {
    let v = -dot2(z, k * n, 1, r, 0, n, rhsBottom ? -rhsBottom[k]! : 0);
    if (zLow) v -= dot2(zLow, k * n, 1, r, 0, n);
    g[k] = v;
  }
  // Correction: h = R⁻ᵀ g; d = Qᵀ f; dc = R⁻¹(d₁ − h); dr = Q [h; d₂].
  solveRt(qr, g);
  applyQt(qr, f);
  const dc = new Float64Array(rank);
  for (let k = 0; k < rank; k++) dc[k] = f[k]! - g[k]!;
  solveR(qr, dc);
  for (let k = 0; k < rank; k++) f[k] = g[k]!;
  applyQ(qr, f);
  for (let k = 0; k < rank; k++) c[k] += dc[k]!;
  for (let i = 0; i < n; i++) r[i] += f[i]!;
}

/** Smallest n·p for the chunked triangle: below it the direct factorisation (and refinement) cost little. */
const CHUNKED_MIN_SIZE = 200_000;
/** Rows per block when forming residuals column by column. */
const RESIDUAL_BLOCK = 2048;

interface StartingSolution {
  /** Pivoted QR whose R is the R of X (of X itself, or of X's triangle). */
  qr: PivotedQr;
  /** Solution in scaled, pivoted coordinates (length rank). */
  c: Float64Array;
  /** |R_00| / |R_rr| (see LeastSquaresFit.conditionEstimate). */
  conditionEstimate: number;
  /** Refinement is called for: the estimate above exceeds 1e4, or (for n·p above 200,000) R's 1-norm condition number does. */
  illConditioned: boolean;
  factorisation: 'row-chunks' | 'whole-matrix';
}

/** Refinement steps for the coefficients and whether the covariance is refined, as the options and conditioning ask. */
function refinementPlan(options: LeastSquaresOptions, n: number, p: number, illConditioned: boolean): { steps: number; refineCovariance: boolean; refine: boolean } {
  // Refinement: always when ill-conditioned; once for well-conditioned problems of modest size,
  // where it costs little; not for large well-conditioned ones, where QR alone is accurate to
  // about n·κ·ε and the extended-precision passes would dominate the time.
  const steps = options.refinementSteps ?? (illConditioned ? 3 : n * p <= CHUNKED_MIN_SIZE ? 1 : 0);
  const refineCov = options.refineCovariance ?? 'auto';
  const refineCovariance = refineCov === true || (refineCov === 'auto' && illConditioned);
  return { steps, refineCovariance, refine: steps > 0 || refineCovariance };
}

/**
 * How well X is conditioned, from its (scaled) R. The ratio of R's extreme diagonal entries is a
 * lower bound that can miss by orders of magnitude (polynomial columns); large problems, which are
 * not refined by default, also take the 1-norm condition number ‖R‖₁‖R⁻¹‖₁ (R⁻¹ column by column,
 * rank³ operations) so that only truly well-conditioned ones go without refinement.
 */
function conditionOf(qr: PivotedQr, n: number, p: number): { conditionEstimate: number; illConditioned: boolean } {
  const rank = qr.rank;
  if (rank === 0) return { conditionEstimate: Infinity, illConditioned: true };
  let dmax = 0;
  let dmin = Infinity;
  for (let k = 0; k < rank; k++) {
    dmax = Math.max(dmax, Math.abs(qr.diag[k]!));
    dmin = Math.min(dmin, Math.abs(qr.diag[k]!));
  }
  const conditionEstimate = dmax / dmin;
  if (conditionEstimate > ILL_CONDITIONED) return { conditionEstimate, illConditioned: true };
  if (n * p <= CHUNKED_MIN_SIZE) return { conditionEstimate, illConditioned: false };
  let normR = 0;
  for (let j = 0; j < rank; j++) {
    let s = 0;
    for (let i = 0; i <= j; i++) s += Math.abs(rAt(qr, i, j));
    normR = Math.max(normR, s);
  }
  let normInv = 0;
  const e = new Float64Array(rank);
  for (let j = 0; j < rank; j++) {
    e.fill(0);
    e[j] = 1;
    solveR(qr, e);
    let s = 0;
    for (let i = 0; i <= j; i++) s += Math.abs(e[i]!);
    normInv = Math.max(normInv, s);
  }
  return { conditionEstimate, illConditioned: !(normR * normInv <= ILL_CONDITIONED) };
}

function chunkedEligible(n: number, p: number, options: LeastSquaresOptions): boolean {
  if (n * p <= CHUNKED_MIN_SIZE || n < 4 * (p + 1)) return false;
  return !((options.refinementSteps ?? 0) > 0 || options.refineCovariance === true);
}

/** Householder QR with column pivoting of X itself, and the solution from it. */
function directStart(x: Float64Array, yv: Float64Array, n: number, p: number, options: LeastSquaresOptions): StartingSolution {
  const qr = pivotedQr(x, n, p, options.rankTolerance);
  // Initial solution c (scaled, pivoted order).
  const qty = Float64Array.from(yv);
  applyQt(qr, qty);
  const c = qty.slice(0, qr.rank);
  solveR(qr, c);
  return { qr, c, ...conditionOf(qr, n, p), factorisation: 'whole-matrix' };
}

/**
 * The triangle R₀ and Q₀ᵀy of [X y] by chunks, then Householder QR with column pivoting and rank
 * detection of R₀ (p × p): X Π = Q₀ Q₁ R, so R, the pivots and the rank are those of X.
 */
function chunkedStart(x: Float64Array, yv: Float64Array, n: number, p: number, options: LeastSquaresOptions): StartingSolution {
  const q = p + 1;
  const t = largeTriangle(x, yv, n, p);
  const r0 = new Float64Array(p * p);
  for (let j = 0; j < p; j++) for (let i = 0; i <= j; i++) r0[j * p + i] = t[j * q + i]!;
  // The rank tolerance is that of the n × p problem.
  const qr = pivotedQr(r0, p, p, options.rankTolerance ?? Math.max(n, p) * 1e-15);
  const z = t.slice(p * q, p * q + p);
  applyQt(qr, z);
  const c = z.slice(0, qr.rank);
  solveR(qr, c);
  return { qr, c, ...conditionOf(qr, n, p), factorisation: 'row-chunks' };
}

/**
 * r = y − Z c with Z the scaled basis columns of x, column by column within blocks of rows (r stays
 * in cache); with `g`, also g = Zᵀr from the same blocks while they are in cache.
 */
function residualsInto(r: Float64Array, x: Float64Array, yv: Float64Array, qr: PivotedQr, c: Float64Array, g?: Float64Array): void {
  const { rank, pivot, scale } = qr;
  const n = yv.length;
  r.set(yv);
  const ck = new Float64Array(rank);
  for (let k = 0; k < rank; k++) ck[k] = c[k]! / scale[pivot[k]!]!;
  if (g) g.fill(0);
  for (let i0 = 0; i0 < n; i0 += RESIDUAL_BLOCK) {
    const i1 = Math.min(n, i0 + RESIDUAL_BLOCK);
    // Four columns per pass over the block of r (one load and store of r for four products).
    let k = 0;
    for (; k + 3 < rank; k += 4) {
      const o0 = pivot[k]! * n;
      const o1 = pivot[k + 1]! * n;
      const o2 = pivot[k + 2]! * n;
      const o3 = pivot[k + 3]! * n;
      const b0 = ck[k]!;
      const b1 = ck[k + 1]!;
      const b2 = ck[k + 2]!;
      const b3 = ck[k + 3]!;
      for (let i = i0; i < i1; i++) r[i] -= x[o0 + i]! * b0 + x[o1 + i]! * b1 + x[o2 + i]! * b2 + x[o3 + i]! * b3;
    }
    for (; k < rank; k++) {
      const off = pivot[k]! * n;
      const b = ck[k]!;
      for (let i = i0; i < i1; i++) r[i] -= x[off + i]! * b;
    }
    if (!g) continue;
    k = 0;
    for (; k + 3 < rank; k += 4) {
      const o0 = pivot[k]! * n;
      const o1 = pivot[k + 1]! * n;
      const o2 = pivot[k + 2]! * n;
      const o3 = pivot[k + 3]! * n;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      for (let i = i0; i < i1; i++) {
        const ri = r[i]!;
        s0 += x[o0 + i]! * ri;
        s1 += x[o1 + i]! * ri;
        s2 += x[o2 + i]! * ri;
        s3 += x[o3 + i]! * ri;
      }
      g[k] += s0;
      g[k + 1] += s1;
      g[k + 2] += s2;
      g[k + 3] += s3;
    }
    for (; k < rank; k++) {
      const off = pivot[k]! * n;
      let s = 0;
      for (let i = i0; i < i1; i++) s += x[off + i]! * r[i]!;
      g[k] += s;
    }
  }
  if (g) for (let k = 0; k < rank; k++) g[k] /= scale[pivot[k]!]!;
}

/**
 * Least squares fit of y on the columns of X (column-major n × p). Aliased columns (beyond the
 * numerical rank) get NaN coefficients; the others are the fit on the estimable basis.
 */
export function leastSquares(x: Float64Array, y: ArrayLike<number>, n: number, p: number, options: LeastSquaresOptions = {}): LeastSquaresFit {
  const yv = largeColumnArray(n);
  yv.set(y);
  // Large problems: the triangle of [X y] by chunks, then pivoting and rank detection on it; used
  // unless the conditioning calls for refinement, which needs the reflectors of X itself.
  let start = chunkedEligible(n, p, options) ? chunkedStart(x, yv, n, p, options) : null;
  if (start && refinementPlan(options, n, p, start.illConditioned).refine) start = null;
  start ??= directStart(x, yv, n, p, options);
  const { qr, c, conditionEstimate, illConditioned } = start;
  const { rank, pivot, scale } = qr;
  const { steps, refineCovariance: doRefine } = refinementPlan(options, n, p, illConditioned);

  const r = new Float64Array(n);
  let z: Float64Array | null = null;
  let zLow: Float64Array | null = null;
  if (steps > 0 || doRefine) {
    z = scaledBasis(x, qr);
    const low = typeof options.xLow === 'function' ? (illConditioned ? options.xLow() : null) : options.xLow;
    zLow = low ? scaledBasis(low, qr) : null;
    // Residual r = y − Z c in extended precision.
    for (let i = 0; i < n; i++) r[i] = residualRow(z, zLow, n, rank, i, c, yv[i]!, 0);
    for (let s = 0; s < steps; s++) refineAugmented(qr, z, zLow, r, c, yv, null);
  } else {
    const correct = start.factorisation === 'row-chunks' && options.refinementSteps === undefined;
    const g = correct ? new Float64Array(rank) : undefined;
    residualsInto(r, x, yv, qr, c, g);
    if (g) {
      // One corrected semi-normal step in working precision, c += R⁻¹R⁻ᵀ Zᵀr: the triangle alone
      // leaves small coefficients of polynomial-like columns a few digits short (R is the same,
      // but the reflectors that refinement would use are not kept); this step restores them.
      solveRt(qr, g);
      solveR(qr, g);
      for (let k = 0; k < rank; k++) c[k] += g[k]!;
      residualsInto(r, x, yv, qr, c);
    }
  }

  // Unscaled covariance over the basis, in pivoted order first: (ZᵀZ)⁻¹ = R⁻¹R⁻ᵀ.
  const cov = new Float64Array(rank * rank);
  const e = new Float64Array(rank);
  for (let j = 0; j < rank; j++) {
    e.fill(0);
    e[j] = 1;
    const w = Float64Array.from(e);
    solveRt(qr, w);
    solveR(qr, w); // w = (ZᵀZ)⁻¹ e_j
    if (doRefine && z) {
      // [I Z; Zᵀ 0][r; u] = [0; e_j] has u = −(ZᵀZ)⁻¹ e_j and r = −Z u.
      const u = new Float64Array(rank);
      for (let k = 0; k < rank; k++) u[k] = -w[k]!;
      const rr = new Float64Array(n);
      for (let i = 0; i < n; i++) rr[i] = residualRow(z, zLow, n, rank, i, u, 0, 0);
      for (let s = 0; s < 2; s++) refineAugmented(qr, z, zLow, rr, u, null, e);
      for (let k = 0; k < rank; k++) w[k] = -u[k]!;
    }
    for (let k = 0; k < rank; k++) cov[k * rank + j] = w[k]!;
  }

  // Back to original columns and units: b_j = c_k / scale_j; cov scales likewise.
  const coefficients = new Float64Array(p).fill(NaN);
  for (let k = 0; k < rank; k++) coefficients[pivot[k]!] = c[k]! / scale[pivot[k]!]!;
  const basis = Array.from(pivot.slice(0, rank)).sort((u, v) => u - v);
  const aliased = Array.from(pivot.slice(rank)).sort((u, v) => u - v);
  const posOf = new Map<number, number>();
  for (let k = 0; k < rank; k++) posOf.set(pivot[k]!, k);
  const unscaledCovariance = new Float64Array(rank * rank);
  for (let i = 0; i < rank; i++) {
    const ki = posOf.get(basis[i]!)!;
    for (let j = 0; j < rank; j++) {
      const kj = posOf.get(basis[j]!)!;
      // Average the two triangles: rounding leaves them a few ulps apart.
      unscaledCovariance[i * rank + j] = (0.5 * (cov[ki * rank + kj]! + cov[kj * rank + ki]!)) / (scale[basis[i]!]! * scale[basis[j]!]!);
    }
  }
  const fitted = new Float64Array(n);
  let rss = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    fitted[i] = yv[i]! - r[i]!;
    const sq = r[i]! * r[i]!;
    const t = rss + sq;
    if (rss >= sq) comp += (rss - t) + sq;
    else comp += (sq - t) + rss;
    rss = t;
  }
  return {
    n,
    p,
    rank,
    coefficients,
    basis,
    aliased,
    unscaledCovariance,
    fitted,
    residuals: r,
    residualSumOfSquares: rss + comp,
    conditionEstimate,
    factorisation: start.factorisation,
  };
}
