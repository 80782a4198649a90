/**
 * Small dense kernels on row-major Float64Arrays for the design engine: information matrix,
 * Cholesky factor, log-determinant, inverse and a rank check that names dependent columns.
 */

/** X'X (p × p, row-major) of an n × p row-major model matrix. */
export function informationMatrix(x: Float64Array, n: number, p: number): Float64Array {
  const m = new Float64Array(p * p);
  for (let r = 0; r < n; r++) {
    const o = r * p;
    for (let i = 0; i < p; i++) {
      const xi = x[o + i]!;
      if (xi === 0) continue;
      for (let j = i; j < p; j++) m[i * p + j]! += xi * x[o + j]!;
    }
  }
  for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) m[i * p + j] = m[j * p + i]!;
  return m;
}

/** Lower Cholesky factor of a symmetric positive-definite matrix, or null when it is not. */
export function cholesky(a: Float64Array, p: number): Float64Array | null {
  const l = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    let d = a[j * p + j]!;
    for (let k = 0; k < j; k++) d -= l[j * p + k]! * l[j * p + k]!;
    if (!(d > 1e-12 * Math.max(1, Math.abs(a[j * p + j]!)))) return null;
    const ljj = Math.sqrt(d);
    l[j * p + j] = ljj;
    for (let i = j + 1; i < p; i++) {
      let s = a[i * p + j]!;
      for (let k = 0; k < j; k++) s -= l[i * p + k]! * l[j * p + k]!;
      l[i * p + j] = s / ljj;
    }
  }
  return l;
}

/** log |A| from its Cholesky factor. */
export function logDetFromCholesky(l: Float64Array, p: number): number {
  let s = 0;
  for (let i = 0; i < p; i++) s += Math.log(l[i * p + i]!);
  return 2 * s;
}

/** A^-1 from the Cholesky factor L of A (A = L L'). */
export function inverseFromCholesky(l: Float64Array, p: number): Float64Array {
  // Invert L (lower triangular), then A^-1 = L^-T L^-1.
  const li = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    li[i * p + i] = 1 / l[i * p + i]!;
    for (let j = 0; j < i; j++) {
      let s = 0;
      for (let k = j; k < i; k++) s += l[i * p + k]! * li[k * p + j]!;
      li[i * p + j] = -s / l[i * p + i]!;
    }
  }
  const inv = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < p; k++) s += li[k * p + i]! * li[k * p + j]!;
      inv[i * p + j] = s;
      inv[j * p + i] = s;
    }
  }
  return inv;
}

/** x' A x for symmetric A (p × p). */
export function quadraticForm(a: Float64Array, x: ArrayLike<number>, p: number): number {
  let s = 0;
  for (let i = 0; i < p; i++) {
    const xi = x[i]!;
    if (xi === 0) continue;
    let r = 0;
    for (let j = 0; j < p; j++) r += a[i * p + j]! * x[j]!;
    s += xi * r;
  }
  return s;
}

/**
 * Columns of an n × p model matrix that are linear combinations of earlier columns, by modified
 * Gram–Schmidt with a relative tolerance (common practice, no source). Returns their indices.
 */
export function dependentColumns(x: Float64Array, n: number, p: number, tol = 1e-9): number[] {
  const basis: Float64Array[] = [];
  const dependent: number[] = [];
  for (let j = 0; j < p; j++) {
    const v = new Float64Array(n);
    let norm0 = 0;
    for (let r = 0; r < n; r++) {
      v[r] = x[r * p + j]!;
      norm0 += v[r]! * v[r]!;
    }
    // Two passes of orthogonalisation keep the residual accurate.
    for (let pass = 0; pass < 2; pass++) {
      for (const q of basis) {
        let dot = 0;
        for (let r = 0; r < n; r++) dot += q[r]! * v[r]!;
        for (let r = 0; r < n; r++) v[r]! -= dot * q[r]!;
      }
    }
    let norm = 0;
    for (let r = 0; r < n; r++) norm += v[r]! * v[r]!;
    if (norm0 === 0 || norm <= tol * tol * norm0 || norm === 0) {
      dependent.push(j);
      continue;
    }
    const s = 1 / Math.sqrt(norm);
    for (let r = 0; r < n; r++) v[r]! *= s;
    basis.push(v);
  }
  return dependent;
}
