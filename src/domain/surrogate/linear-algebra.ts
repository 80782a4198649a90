/**
 * Dense symmetric-positive-definite linear algebra on row-major Float64Array matrices, the hot loops
 * of Gaussian-process fitting. Kept here (rather than ml-matrix's array-of-arrays Cholesky) because the
 * likelihood is evaluated many times per fit; bench/cases/surrogate.ts times both.
 *
 * The O(n³) kernels run as contiguous dot products over rows, four rows against two at a time (eight
 * independent accumulators sharing six loads), the shape a JavaScript engine runs fastest.
 */

/**
 * In-place Cholesky factorisation A = L Lᵀ of a symmetric n × n matrix (row-major; only the lower
 * triangle is read). On success the lower triangle holds L, the upper triangle is zeroed and the
 * function returns true; it returns false when A is not numerically positive definite.
 */
export function choleskyInPlace(a: Float64Array, n: number): boolean {
  // Left-looking, two columns (j, j + 1) at a time: L_ij = (A_ij − Σ_{k<j} L_ik L_jk) / L_jj.
  let j = 0;
  for (; j + 1 < n; j += 2) {
    const rj = j * n;
    const rj1 = rj + n;
    let djj = a[rj + j]!;
    let dj1j = a[rj1 + j]!;
    let dj1j1 = a[rj1 + j + 1]!;
    for (let k = 0; k < j; k++) {
      const x = a[rj + k]!;
      const y = a[rj1 + k]!;
      djj -= x * x;
      dj1j -= y * x;
      dj1j1 -= y * y;
    }
    if (!(djj > 0) || !Number.isFinite(djj)) return false;
    const ljj = Math.sqrt(djj);
    const inv0 = 1 / ljj;
    const lj1j = dj1j * inv0;
    dj1j1 -= lj1j * lj1j;
    if (!(dj1j1 > 0) || !Number.isFinite(dj1j1)) return false;
    const lj1j1 = Math.sqrt(dj1j1);
    const inv1 = 1 / lj1j1;
    a[rj + j] = ljj;
    a[rj1 + j] = lj1j;
    a[rj1 + j + 1] = lj1j1;
    let i = j + 2;
    for (; i + 3 < n; i += 4) {
      const r0 = i * n;
      const r1 = r0 + n;
      const r2 = r1 + n;
      const r3 = r2 + n;
      let s00 = 0;
      let s01 = 0;
      let s10 = 0;
      let s11 = 0;
      let s20 = 0;
      let s21 = 0;
      let s30 = 0;
      let s31 = 0;
      for (let k = 0; k < j; k++) {
        const y0 = a[rj + k]!;
        const y1 = a[rj1 + k]!;
        const x0 = a[r0 + k]!;
        const x1 = a[r1 + k]!;
        const x2 = a[r2 + k]!;
        const x3 = a[r3 + k]!;
        s00 += x0 * y0;
        s01 += x0 * y1;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s20 += x2 * y0;
        s21 += x2 * y1;
        s30 += x3 * y0;
        s31 += x3 * y1;
      }
      const l0 = (a[r0 + j]! - s00) * inv0;
      const l1 = (a[r1 + j]! - s10) * inv0;
      const l2 = (a[r2 + j]! - s20) * inv0;
      const l3 = (a[r3 + j]! - s30) * inv0;
      a[r0 + j] = l0;
      a[r1 + j] = l1;
      a[r2 + j] = l2;
      a[r3 + j] = l3;
      a[r0 + j + 1] = (a[r0 + j + 1]! - s01 - l0 * lj1j) * inv1;
      a[r1 + j + 1] = (a[r1 + j + 1]! - s11 - l1 * lj1j) * inv1;
      a[r2 + j + 1] = (a[r2 + j + 1]! - s21 - l2 * lj1j) * inv1;
      a[r3 + j + 1] = (a[r3 + j + 1]! - s31 - l3 * lj1j) * inv1;
    }
    for (; i < n; i++) {
      const ri = i * n;
      let s0 = 0;
      let s1 = 0;
      for (let k = 0; k < j; k++) {
        const x = a[ri + k]!;
        s0 += x * a[rj + k]!;
        s1 += x * a[rj1 + k]!;
      }
      const li = (a[ri + j]! - s0) * inv0;
      a[ri + j] = li;
      a[ri + j + 1] = (a[ri + j + 1]! - s1 - li * lj1j) * inv1;
    }
  }
  if (j < n) {
    // The last column when n is odd.
    const rj = j * n;
    let d = a[rj + j]!;
    for (let k = 0; k < j; k++) {
      const v = a[rj + k]!;
      d -= v * v;
    }
    if (!(d > 0) || !Number.isFinite(d)) return false;
    a[rj + j] = Math.sqrt(d);
  }
  for (let i = 0; i < n; i++) a.fill(0, i * n + i + 1, (i + 1) * n);
  return true;
}

/** Solve L x = b by forward substitution (L lower-triangular, row-major n × n). */
export function solveLower(l: Float64Array, n: number, b: ArrayLike<number>, out: Float64Array = new Float64Array(n)): Float64Array {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let s0 = b[i]!;
    let s1 = 0;
    let k = 0;
    for (; k + 1 < i; k += 2) {
      s0 -= l[row + k]! * out[k]!;
      s1 -= l[row + k + 1]! * out[k + 1]!;
    }
    if (k < i) s0 -= l[row + k]! * out[k]!;
    out[i] = (s0 + s1) / l[row + i]!;
  }
  return out;
}

/** Solve Lᵀ x = b by back substitution. */
export function solveUpperTransposed(l: Float64Array, n: number, b: ArrayLike<number>, out: Float64Array = new Float64Array(n)): Float64Array {
  for (let i = 0; i < n; i++) out[i] = b[i]!;
  for (let i = n - 1; i >= 0; i--) {
    const xi = out[i]! / l[i * n + i]!;
    out[i] = xi;
    const row = i * n;
    for (let k = 0; k < i; k++) out[k] = out[k]! - l[row + k]! * xi;
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
 * U = L⁻ᵀ (upper triangular, row-major): row j of U is column j of L⁻¹, from L z = e_j by forward substitution,
 * U_ji = −(Σ_{j≤k<i} L_ik U_jk) / L_ii, for two rows of U and four rows of L at a time. Zero below the diagonal.
 */
export function inverseTransposeOfLower(l: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  const u = out;
  let j = 0;
  for (; j + 1 < n; j += 2) {
    const u0 = j * n;
    const u1 = u0 + n;
    u.fill(0, u0, u0 + j);
    u.fill(0, u1, u1 + j + 1);
    const d0 = 1 / l[u0 + j]!;
    const d1 = 1 / l[u1 + j + 1]!;
    u[u0 + j] = d0;
    u[u0 + j + 1] = -l[u1 + j]! * d0 * d1;
    u[u1 + j + 1] = d1;
    let i = j + 2;
    for (; i + 3 < n; i += 4) {
      const r0 = i * n;
      const r1 = r0 + n;
      const r2 = r1 + n;
      const r3 = r2 + n;
      let s00 = 0;
      let s01 = 0;
      let s10 = 0;
      let s11 = 0;
      let s20 = 0;
      let s21 = 0;
      let s30 = 0;
      let s31 = 0;
      for (let k = j; k < i; k++) {
        const y0 = u[u0 + k]!;
        const y1 = u[u1 + k]!;
        const x0 = l[r0 + k]!;
        const x1 = l[r1 + k]!;
        const x2 = l[r2 + k]!;
        const x3 = l[r3 + k]!;
        s00 += x0 * y0;
        s01 += x0 * y1;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s20 += x2 * y0;
        s21 += x2 * y1;
        s30 += x3 * y0;
        s31 += x3 * y1;
      }
      // The triangle inside the block: row i + q also needs U_j,(i..i+q−1), found just before it.
      const a0 = -s00 / l[r0 + i]!;
      const b0 = -s01 / l[r0 + i]!;
      const a1 = -(s10 + l[r1 + i]! * a0) / l[r1 + i + 1]!;
      const b1 = -(s11 + l[r1 + i]! * b0) / l[r1 + i + 1]!;
      const a2 = -(s20 + l[r2 + i]! * a0 + l[r2 + i + 1]! * a1) / l[r2 + i + 2]!;
      const b2 = -(s21 + l[r2 + i]! * b0 + l[r2 + i + 1]! * b1) / l[r2 + i + 2]!;
      const a3 = -(s30 + l[r3 + i]! * a0 + l[r3 + i + 1]! * a1 + l[r3 + i + 2]! * a2) / l[r3 + i + 3]!;
      const b3 = -(s31 + l[r3 + i]! * b0 + l[r3 + i + 1]! * b1 + l[r3 + i + 2]! * b2) / l[r3 + i + 3]!;
      u[u0 + i] = a0;
      u[u0 + i + 1] = a1;
      u[u0 + i + 2] = a2;
      u[u0 + i + 3] = a3;
      u[u1 + i] = b0;
      u[u1 + i + 1] = b1;
      u[u1 + i + 2] = b2;
      u[u1 + i + 3] = b3;
    }
    for (; i < n; i++) {
      const ri = i * n;
      let s0 = 0;
      let s1 = 0;
      for (let k = j; k < i; k++) {
        const x = l[ri + k]!;
        s0 += x * u[u0 + k]!;
        s1 += x * u[u1 + k]!;
      }
      const inv = 1 / l[ri + i]!;
      u[u0 + i] = -s0 * inv;
      u[u1 + i] = -s1 * inv;
    }
  }
  if (j < n) {
    const u0 = j * n;
    u.fill(0, u0, u0 + j);
    u[u0 + j] = 1 / l[u0 + j]!;
  }
  return u;
}

/**
 * Lower triangle (with the diagonal) of (L Lᵀ)⁻¹ = U Uᵀ, U = L⁻ᵀ: entry (i, j), i ≥ j, is the dot product of
 * rows i and j of U from column i on (U is zero below its diagonal). Written into `out` (row-major n × n);
 * the strict upper triangle is left untouched. `work`, when given, receives U.
 */
export function inverseLowerFromCholesky(l: Float64Array, n: number, out: Float64Array = new Float64Array(n * n), work?: Float64Array): Float64Array {
  const u = inverseTransposeOfLower(l, n, work);
  // Column pairs (j, j+1) against row quadruples (i..i+3) with i ≥ j + 2; then the leftover rows and the diagonal block.
  let j = 0;
  for (; j + 1 < n; j += 2) {
    const c0 = j * n;
    const c1 = c0 + n;
    // Diagonal block (j, j+1) × (j, j+1); u[j+1][j] is zero.
    let d00 = 0;
    let d10 = 0;
    let d11 = 0;
    for (let k = j; k < n; k++) {
      const x0 = u[c0 + k]!;
      const x1 = u[c1 + k]!;
      d00 += x0 * x0;
      d10 += x1 * x0;
      d11 += x1 * x1;
    }
    out[c0 + j] = d00;
    out[c1 + j] = d10;
    out[c1 + j + 1] = d11;
    let i = j + 2;
    for (; i + 3 < n; i += 4) {
      const r0 = i * n;
      const r1 = r0 + n;
      const r2 = r1 + n;
      const r3 = r2 + n;
      let s00 = 0;
      let s01 = 0;
      let s10 = 0;
      let s11 = 0;
      let s20 = 0;
      let s21 = 0;
      let s30 = 0;
      let s31 = 0;
      for (let k = i; k < n; k++) {
        const y0 = u[c0 + k]!;
        const y1 = u[c1 + k]!;
        const x0 = u[r0 + k]!;
        const x1 = u[r1 + k]!;
        const x2 = u[r2 + k]!;
        const x3 = u[r3 + k]!;
        s00 += x0 * y0;
        s01 += x0 * y1;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s20 += x2 * y0;
        s21 += x2 * y1;
        s30 += x3 * y0;
        s31 += x3 * y1;
      }
      out[r0 + j] = s00;
      out[r0 + j + 1] = s01;
      out[r1 + j] = s10;
      out[r1 + j + 1] = s11;
      out[r2 + j] = s20;
      out[r2 + j + 1] = s21;
      out[r3 + j] = s30;
      out[r3 + j + 1] = s31;
    }
    for (; i < n; i++) {
      const ri = i * n;
      let s0 = 0;
      let s1 = 0;
      for (let k = i; k < n; k++) {
        const x = u[ri + k]!;
        s0 += x * u[c0 + k]!;
        s1 += x * u[c1 + k]!;
      }
      out[ri + j] = s0;
      out[ri + j + 1] = s1;
    }
  }
  if (j < n) {
    // The last column when n is odd: only its diagonal entry lies in the lower triangle.
    const c0 = j * n;
    const x = u[c0 + j]!;
    out[c0 + j] = x * x;
  }
  return out;
}

/** (L Lᵀ)⁻¹ from the Cholesky factor, the full symmetric matrix, row-major. */
export function inverseFromCholesky(l: Float64Array, n: number): Float64Array {
  const inv = inverseLowerFromCholesky(l, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) inv[j * n + i] = inv[i * n + j]!;
  return inv;
}
