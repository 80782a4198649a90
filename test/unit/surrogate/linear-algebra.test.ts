import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix, inverse } from 'ml-matrix';
import { choleskyInPlace, choleskyLogDet, choleskySolve, inverseFromCholesky } from '@/domain/surrogate/linear-algebra';
import { seededRandom } from '@/domain/random';

function randomSpd(n: number, seed: number): Matrix {
  const rng = seededRandom(seed);
  const a = Matrix.zeros(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a.set(i, j, rng.next() - 0.5);
  return a.mmul(a.transpose()).add(Matrix.eye(n, n).mul(0.1));
}

describe('Float64Array Cholesky kernels (checked against ml-matrix)', () => {
  const n = 12;
  const a = randomSpd(n, 5);
  const flat = Float64Array.from(a.to1DArray());

  it('factor matches ml-matrix and reproduces A', () => {
    const l = Float64Array.from(flat);
    expect(choleskyInPlace(l, n)).toBe(true);
    const ref = new CholeskyDecomposition(a).lowerTriangularMatrix;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(l[i * n + j]).toBeCloseTo(ref.get(i, j), 10);
    let logDet = 0;
    for (let i = 0; i < n; i++) logDet += 2 * Math.log(ref.get(i, i));
    expect(choleskyLogDet(l, n)).toBeCloseTo(logDet, 10);
  });

  it('solve and inverse agree with ml-matrix', () => {
    const l = Float64Array.from(flat);
    choleskyInPlace(l, n);
    const b = Array.from({ length: n }, (_, i) => Math.sin(i + 1));
    const x = choleskySolve(l, n, b);
    const ax = a.mmul(Matrix.columnVector(Array.from(x)));
    for (let i = 0; i < n; i++) expect(ax.get(i, 0)).toBeCloseTo(b[i]!, 10);
    const inv = inverseFromCholesky(l, n);
    const ref = inverse(a);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(inv[i * n + j]).toBeCloseTo(ref.get(i, j), 8);
  });

  // The kernels work on blocks of two columns and four rows: every remainder case must agree too.
  it('factor and inverse agree with ml-matrix for every block remainder (n = 1 … 11)', () => {
    for (let m = 1; m <= 11; m++) {
      const am = randomSpd(m, 40 + m);
      const l = Float64Array.from(am.to1DArray());
      expect(choleskyInPlace(l, m)).toBe(true);
      const ref = new CholeskyDecomposition(am).lowerTriangularMatrix;
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) expect(l[i * m + j]).toBeCloseTo(ref.get(i, j), 10);
      const inv = inverseFromCholesky(l, m);
      const refInv = inverse(am);
      const scale = Math.max(...refInv.to1DArray().map(Math.abs));
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) expect(Math.abs(inv[i * m + j]! - refInv.get(i, j)) / scale).toBeLessThan(1e-9);
    }
  });

  it('reports a matrix that is not positive definite', () => {
    const m = Float64Array.from([1, 2, 2, 1]);
    expect(choleskyInPlace(m, 2)).toBe(false);
  });
});
