/**
 * Dense symmetric-positive-definite linear algebra on row-major Float64Array matrices, the hot loops
 * of Gaussian-process fitting. Kept here (rather than ml-matrix's array-of-arrays Cholesky) because the
 * likelihood is evaluated hundreds of times per fit; bench/cases/surrogate.ts times both.
 */

/**
 * In-place Cholesky factorisation A = L Lᵀ of a symmetric n × n matrix (row-major; only the lower
 * triangle is read). On success the lower triangle holds L, the upper triangle is zeroed and the
 * function returns true; it returns false when A is not numerically positive definite.
 */
export function choleskyInPlace(a: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    const rowJ = j * n;
    let d = a[rowJ + j]!;
    for (let k = 0; k < j; k++) {
      const v = a[rowJ + k]!;
      d -= v * v;
    }
    if (!(d > 0) || !Number.isFinite(d)) return false;
    const ljj = Math.sqrt(d);
    a[rowJ + j] = ljj;
    const inv = 1 / ljj;
    for (let i = j + 1; i < n; i++) {
      const rowI = i * n;
      let s = a[rowI + j]!;
      for (let k = 0; k < j; k++) s -= a[rowI + k]! * a[rowJ + k]!;
      a[rowI + j] = s * inv;
    }
  }
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) a[i * n + j] = 0;
  return true;
}

/** Solve L x = b by forward substitution (L lower-triangular, row-major n × n). */
export function solveLower(l: Float64Array, n: number, b: ArrayLike<number>, out = new Float64Array(n)): Float64Array {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[row + k]! * out[k]!;
    out[i] = s / l[row + i]!;
  }
  return out;
}

/** Solve Lᵀ x = b by back substitution. */
export function solveUpperTransposed(l: Float64Array, n: number, b: ArrayLike<number>, out = new Float64Array(n)): Float64Array {
  for (let i = 0; i < n; i++) out[i] = b[i]!;
  for (let i = n - 1; i >= 0; i--) {
    const xi = out[i]! / l[i * n + i]!;
    out[i] = xi;
    for (let k = 0; k < i; k++) out[k] = out[k]! - l[i * n + k]! * xi;
  }
  return out;
}

/** Solve (L Lᵀ) x = b. */
export function choleskySolve(l: Float64Array, n: number, b: ArrayLike<number>): Float64Array {
  return solveUpperTransposed(l, n, solveLower(l, n, b));
}

/** log det(L Lᵀ) = 2 Σ log L_ii. */
export function choleskyLogDet(l: Float64Array, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.log(l[i * n + i]!);
  return 2 * s;
}

/**
 * (L Lᵀ)⁻¹ from the Cholesky factor: invert L in place of a work array, then form L⁻ᵀ L⁻¹.
 * Returns the full symmetric inverse, row-major.
 */
export function inverseFromCholesky(l: Float64Array, n: number): Float64Array {
  // M = L⁻¹ (lower triangular), row by row: M_ij = -(Σ_{j≤k<i} L_ik M_kj) / L_ii, M_ii = 1 / L_ii.
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const rowI = i * n;
    for (let k = 0; k < i; k++) {
      const lik = l[rowI + k]!;
      if (lik === 0) continue;
      const rowK = k * n;
      for (let j = 0; j <= k; j++) m[rowI + j] = m[rowI + j]! - lik * m[rowK + j]!;
    }
    const inv = 1 / l[rowI + i]!;
    for (let j = 0; j < i; j++) m[rowI + j] = m[rowI + j]! * inv;
    m[rowI + i] = inv;
  }
  // A⁻¹ = Mᵀ M: entry (i, j) = Σ_{k ≥ max(i,j)} M_ki M_kj. Accumulate row by row of M.
  const inv = new Float64Array(n * n);
  for (let k = 0; k < n; k++) {
    const rowK = k * n;
    for (let i = 0; i <= k; i++) {
      const mki = m[rowK + i]!;
      if (mki === 0) continue;
      const rowI = i * n;
      for (let j = 0; j <= i; j++) inv[rowI + j] = inv[rowI + j]! + mki * m[rowK + j]!;
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) inv[j * n + i] = inv[i * n + j]!;
  return inv;
}
