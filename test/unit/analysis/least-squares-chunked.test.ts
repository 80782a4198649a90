/**
 * Large least-squares problems: the triangle of [X y] by row chunks (then pivoting and rank
 * detection on it) against the factorisation of the whole matrix, and the one-pass model matrix
 * against the general build. Deterministic data from fixed formulas (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { buildModelFrame, fitLinearModel, leastSquares, pivotedQr } from '@/domain/analysis';
import { BLOCK_ROWS, blockCount, chunkedTriangle, sequentialBlockTriangle } from '@/domain/analysis/tall-qr';

function matrix(n: number, p: number, f: (i: number, j: number) => number): Float64Array {
  const x = new Float64Array(n * p);
  for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) x[j * n + i] = f(i, j);
  return x;
}

const N = 20_003; // not a multiple of the chunk size
const P = 12;
const x = matrix(N, P, (i, j) => (j === 0 ? 1 : Math.sin(0.0007 * (i + 1) * (j + 0.4) + j)));
const y = Float64Array.from({ length: N }, (_, i) => {
  let s = 0.05 * Math.sin(17.3 * (i + 1));
  for (let j = 0; j < P; j++) s += (j - 5) * 0.3 * x[j * N + i]!;
  return s;
});

function relDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!) / Math.max(1e-300, Math.abs(b[i]!)));
  return m;
}

describe('least squares by row chunks', () => {
  it('agrees with the refined factorisation of the whole matrix', () => {
    const chunked = leastSquares(x, y, N, P);
    const whole = leastSquares(x, y, N, P, { refinementSteps: 2 });
    expect(chunked.factorisation).toBe('row-chunks');
    expect(whole.factorisation).toBe('whole-matrix');
    expect(chunked.rank).toBe(P);
    expect(relDiff(chunked.coefficients, whole.coefficients)).toBeLessThan(1e-11);
    expect(relDiff(chunked.unscaledCovariance, whole.unscaledCovariance)).toBeLessThan(1e-10);
    expect(Math.abs(chunked.residualSumOfSquares - whole.residualSumOfSquares) / whole.residualSumOfSquares).toBeLessThan(1e-11);
  });

  it('R of [X y]: |R| matches the whole-matrix R and the last entry is the residual norm', () => {
    const t = chunkedTriangle(x, y, N, P);
    const q = P + 1;
    const qr = pivotedQr(x, N, P, 0);
    // Without pivoting the triangles agree up to row signs; compare |R_jj| on the diagonal through
    // the norms: |R_00| = ‖x_0‖ and the product of |R_jj| = √det(XᵀX), the same for any pivoting.
    let logDetChunk = 0;
    let logDetWhole = 0;
    for (let j = 0; j < P; j++) {
      logDetChunk += Math.log(Math.abs(t[j * q + j]!));
      logDetWhole += Math.log(Math.abs(qr.diag[j]! * qr.scale[qr.pivot[j]!]!));
    }
    expect(Math.abs(logDetChunk - logDetWhole)).toBeLessThan(1e-10);
    expect(Math.abs(t[0]!)).toBeCloseTo(Math.sqrt(N), 9);
    const fit = leastSquares(x, y, N, P);
    const rho = t[P * q + P]!;
    expect(Math.abs(rho * rho - fit.residualSumOfSquares) / fit.residualSumOfSquares).toBeLessThan(1e-10);
  });

  it('block triangles folded in order: RᵀR = [X y]ᵀ[X y], and the same |R| as one pass of chunks', () => {
    expect(blockCount(N)).toBe(Math.ceil(N / BLOCK_ROWS));
    expect(blockCount(N)).toBeGreaterThan(2);
    const q = P + 1;
    const folded = sequentialBlockTriangle(x, y, N, P);
    const onePass = chunkedTriangle(x, y, N, P);
    const col = (j: number) => (j < P ? x.subarray(j * N, (j + 1) * N) : y);
    for (let a = 0; a < q; a++) {
      for (let b = a; b < q; b++) {
        let gram = 0;
        const ca = col(a);
        const cb = col(b);
        for (let i = 0; i < N; i++) gram += ca[i]! * cb[i]!;
        let rtr = 0;
        for (let k = 0; k <= a; k++) rtr += folded[a * q + k]! * folded[b * q + k]!;
        const scale = Math.sqrt(Math.abs(folded[a * q + a]!) * Math.abs(folded[b * q + b]!)) ** 2 + Math.abs(gram);
        expect(Math.abs(rtr - gram) / scale).toBeLessThan(1e-13);
      }
      expect(Math.abs(Math.abs(folded[a * q + a]!) - Math.abs(onePass[a * q + a]!)) / Math.abs(onePass[a * q + a]!)).toBeLessThan(1e-11);
    }
  });

  it('finds the same rank and aliased columns as the whole matrix', () => {
    // Column 5 = column 2 + column 3: rank 11, the later column aliased.
    const xa = Float64Array.from(x);
    for (let i = 0; i < N; i++) xa[5 * N + i] = xa[2 * N + i]! + xa[3 * N + i]!;
    const chunked = leastSquares(xa, y, N, P);
    const whole = leastSquares(xa, y, N, P, { refinementSteps: 1 });
    expect(chunked.factorisation).toBe('row-chunks');
    expect(chunked.rank).toBe(P - 1);
    expect(chunked.aliased).toEqual(whole.aliased);
    expect(chunked.basis).toEqual(whole.basis);
    const est = (f: typeof chunked) => f.basis.map((col) => f.coefficients[col]!);
    expect(relDiff(est(chunked), est(whole))).toBeLessThan(1e-10);
  });

  it('hands ill-conditioned problems to the refined whole-matrix path', () => {
    // Powers of u in [1, 2]: scaled condition number far above 1e4.
    const xp = matrix(N, 8, (i, j) => Math.pow(1 + i / N, j));
    const yp = Float64Array.from({ length: N }, (_, i) => Math.exp(1 + i / N));
    const fit = leastSquares(xp, yp, N, 8);
    expect(fit.factorisation).toBe('whole-matrix');
    const refined = leastSquares(xp, yp, N, 8, { refinementSteps: 3 });
    expect(Array.from(fit.coefficients)).toEqual(Array.from(refined.coefficients));
  });

  it('keeps small problems on the whole-matrix path', () => {
    const fit = leastSquares(x.subarray(0, 1000 * P), y.subarray(0, 1000), 1000, P);
    expect(fit.factorisation).toBe('whole-matrix');
  });
});

describe('model matrix in one pass over the rows', () => {
  const rows = Array.from({ length: 3000 }, (_, i) => ({
    a: Math.sin(i * 0.37) * 3 + 10,
    b: Math.cos(i * 0.11),
    c: (i % 5) - 2,
    y: Math.sin(i * 1.3) + i * 1e-3,
  }));
  const terms = ['a', 'b', 'a*b', 'c^2', 'b^3', 'a*b*c'];
  // A row with no response takes the general path; the rows used are then the same.
  const withGap = [...rows, { a: 1, b: 2, c: 3, y: null as unknown as number }];

  for (const coding of ['natural', 'coded'] as const) {
    it(`gives the same frame as the general build (${coding} units)`, () => {
      const fast = buildModelFrame({ data: rows, response: 'y', terms, coding });
      const general = buildModelFrame({ data: withGap, response: 'y', terms, coding, factors: fast.factors });
      expect(general.excludedRows).toEqual([3000]);
      expect(fast.n).toBe(3000);
      expect(fast.p).toBe(general.p);
      expect(Array.from(fast.x)).toEqual(Array.from(general.x));
      expect(Array.from(fast.y)).toEqual(Array.from(general.y));
      fast.factorColumns.forEach((col, j) => expect(Array.from(col)).toEqual(Array.from(general.factorColumns[j]!)));
      expect(fast.rowIndex).toEqual(general.rowIndex);
      expect(Array.from(fast.pointMatrix)).toEqual(Array.from(general.pointMatrix));
      expect(Array.from(fast.lowParts()!)).toEqual(Array.from(general.lowParts()!));
      const a = fitLinearModel(fast);
      const b = fitLinearModel(general);
      expect(a.anova).toEqual(b.anova);
    });
  }

  it('infers the factor ranges as the general build does', () => {
    const fast = buildModelFrame({ data: rows, response: 'y', terms: ['a', 'b'] });
    const general = buildModelFrame({ data: withGap, response: 'y', terms: ['a', 'b'] });
    expect(fast.factors.map((f) => f.name)).toEqual(['a', 'b']);
    expect(fast.factors.every((f) => f.kind === 'continuous')).toBe(true);
    // The general build sees the extra row's values too; the fast one only these rows.
    const lo = Math.min(...rows.map((r) => r.a));
    expect(fast.factors[0]).toMatchObject({ kind: 'continuous', low: lo });
    expect(general.factors[0]!.kind).toBe('continuous');
  });
});
