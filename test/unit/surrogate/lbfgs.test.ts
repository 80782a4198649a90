import { describe, expect, it } from 'vitest';
import { minimizeBounded } from '@/domain/surrogate';

describe('bounded L-BFGS', () => {
  it('minimises the Rosenbrock function (unconstrained optimum inside the box)', () => {
    const r = minimizeBounded((x) => {
      const a = x[0]!;
      const b = x[1]!;
      return {
        value: (1 - a) ** 2 + 100 * (b - a * a) ** 2,
        gradient: Float64Array.from([-2 * (1 - a) - 400 * a * (b - a * a), 200 * (b - a * a)]),
      };
    }, [-1.2, 1], { lower: [-5, -5], upper: [5, 5], maxIterations: 500, gradientTolerance: 1e-8, valueTolerance: 0 });
    expect(r.x[0]).toBeCloseTo(1, 4);
    expect(r.x[1]).toBeCloseTo(1, 4);
  });

  it('stops at the bound when the optimum lies outside the box', () => {
    // f = (x − 3)² + (y + 1)², box [0, 2] × [0, 2] → optimum (2, 0).
    const r = minimizeBounded((x) => ({
      value: (x[0]! - 3) ** 2 + (x[1]! + 1) ** 2,
      gradient: Float64Array.from([2 * (x[0]! - 3), 2 * (x[1]! + 1)]),
    }), [1, 1], { lower: [0, 0], upper: [2, 2] });
    expect(r.x[0]).toBeCloseTo(2, 8);
    expect(r.x[1]).toBeCloseTo(0, 8);
    expect(r.converged).toBe(true);
  });
});
