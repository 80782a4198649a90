import { describe, expect, it } from 'vitest';
import { expectedImprovement, logExpectedImprovement, standardNormalPdf } from '@/domain/surrogate';

// E[max(Y − best, 0)] for Y ~ N(mean, sd²) by the trapezoid rule on a fine grid.
function numericalImprovement(mean: number, sd: number, best: number): number {
  const lo = Math.max(best, mean - 12 * sd);
  const hi = Math.max(best, mean + 12 * sd);
  const steps = 200000;
  const h = (hi - lo) / steps;
  let s = 0;
  for (let i = 0; i <= steps; i++) {
    const yv = lo + i * h;
    const w = i === 0 || i === steps ? 0.5 : 1;
    s += w * (yv - best) * standardNormalPdf((yv - mean) / sd) / sd;
  }
  return s * h;
}

describe('expected improvement against its closed form (Jones, Schonlau & Welch 1998)', () => {
  it('matches direct numerical integration of the improvement', () => {
    for (const [mean, sd, best] of [[1, 0.5, 0.8], [0, 1, 2], [3, 0.2, 2.5], [-1, 2, -1]] as const) {
      expect(expectedImprovement(mean, sd, best)).toBeCloseTo(numericalImprovement(mean, sd, best), 7);
    }
  });

  it('log EI equals log of EI where EI is representable and stays finite and monotone far in the tail', () => {
    for (const z of [-0.5, -1, -2, -5, -9, -15, -25]) {
      const ei = expectedImprovement(z, 1, 0);
      if (ei > 1e-300) expect(logExpectedImprovement(z, 1, 0)).toBeCloseTo(Math.log(ei), 6);
    }
    let previous = Infinity;
    for (let z = -5; z >= -60; z -= 0.5) {
      const v = logExpectedImprovement(z, 1, 0);
      expect(Number.isFinite(v)).toBe(true);
      expect(v).toBeLessThan(previous);
      previous = v;
    }
    // Far tail: h(z) ≈ φ(z)/z², so log h(z) ≈ −z²/2 − ½ log 2π − 2 log|z| (Mills-ratio asymptotics).
    const z = -40;
    expect(logExpectedImprovement(z, 1, 0)).toBeCloseTo(-z * z / 2 - 0.5 * Math.log(2 * Math.PI) - 2 * Math.log(40), 2);
  });

  it('continuous across the switch between the direct and tail formulas', () => {
    for (const z0 of [-1, -20]) {
      const a = logExpectedImprovement(z0 + 1e-9, 1, 0);
      const b = logExpectedImprovement(z0 - 1e-9, 1, 0);
      expect(Math.abs(a - b)).toBeLessThan(1e-6);
    }
  });
});
