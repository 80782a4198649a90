import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { Matrix, solve } from 'ml-matrix';
import { arcCrossings, fitFlight } from '@/domain/tracks/fit';

describe('flight arc fit', () => {
  it('recovers an exact parabola and lines, even far from the origin of the capture volume', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -100, max: 100, noNaN: true }), fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: -20, max: -0.5, noNaN: true }),
        fc.double({ min: 0, max: 5000, noNaN: true }), fc.integer({ min: 5, max: 400 }),
        (a, b, c, start, n) => {
          const t = Float64Array.from({ length: n }, (_, i) => start + (i * 0.4) / n + 0.0003 * Math.sin(i));
          const tc = (t[0]! + t[n - 1]!) / 2;
          const z = Float64Array.from(t, (s) => a + b * (s - tc) + c * (s - tc) ** 2);
          const x = Float64Array.from(t, (s) => 1 + 0.3 * (s - tc));
          const y = Float64Array.from(t, (s) => -2 - 0.1 * (s - tc));
          const fit = fitFlight(t, x, y, z, 0, n, null)!;
          expect(fit.c).toBeCloseTo(c, 5);
          expect(fit.qx).toBeCloseTo(0.3, 8);
          expect(fit.qy).toBeCloseTo(-0.1, 8);
          expect(fit.rmsResidual).toBeLessThan(1e-6);
        },
      ),
      { numRuns: 200, seed: 20260306 },
    );
  });

  it('agrees with a general least-squares solve (ml-matrix) on noisy data', () => {
    const n = 50;
    const t = Float64Array.from({ length: n }, (_, i) => i / 100);
    const z = Float64Array.from(t, (s, i) => 0.2 + 1.5 * s - 4.9 * s * s + 0.001 * Math.sin(7 * i));
    const zeros = new Float64Array(n);
    const fit = fitFlight(t, zeros, zeros, z, 0, n, null)!;
    const tau = Array.from(t, (s) => s - fit.t0);
    const X = new Matrix(tau.map((u) => [1, u, u * u]));
    const beta = solve(X.transpose().mmul(X), X.transpose().mmul(Matrix.columnVector(Array.from(z)))).to1DArray();
    expect(fit.a).toBeCloseTo(beta[0]!, 10);
    expect(fit.b).toBeCloseTo(beta[1]!, 10);
    expect(fit.c).toBeCloseTo(beta[2]!, 9);
  });

  it('skips samples whose keep flag is off, and finds where the arc crosses a level', () => {
    const t = Float64Array.of(0, 0.1, 0.2, 0.3, 0.4, 0.5);
    const z = Float64Array.from(t, (s) => 2 * s - 5 * s * s);
    z[2] = 99;
    const zeros = new Float64Array(6);
    const fit = fitFlight(t, zeros, zeros, z, 0, 6, Uint8Array.of(1, 1, 0, 1, 1, 1))!;
    expect(fit.samples).toBe(5);
    const [up, down] = arcCrossings(fit, 0)!;
    expect(up).toBeCloseTo(0, 10);
    expect(down).toBeCloseTo(0.4, 10);
    expect(arcCrossings(fit, 1)).toBeNull();
    expect(fitFlight(t, zeros, zeros, z, 0, 3, null)).toBeNull();
  });
});
