/**
 * Stationary covariance kernels with one length scale per input (ARD). Inputs are coded: numeric
 * factors in [-1, 1]; a categorical factor is its level index, and two different levels count as
 * squared distance 1 in that coordinate. That is the same as placing the levels at the vertices of a
 * regular simplex, so every level pair has the same correlation (an exchangeable, compound-symmetry
 * kernel in that factor) and the combined kernel stays positive definite.
 */

export type KernelKind = 'matern52' | 'squared-exponential';

export const KERNEL_KINDS: readonly KernelKind[] = ['matern52', 'squared-exponential'];

const SQRT5 = Math.sqrt(5);

/** Scaled squared distance Σ_k (Δ_k / ℓ_k)², with Δ_k = [a ≠ b] for categorical coordinates. */
export function scaledSquaredDistance(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  inverseSquaredLengths: ArrayLike<number>,
  categorical: readonly boolean[],
): number {
  let r2 = 0;
  for (let k = 0; k < categorical.length; k++) {
    let d2: number;
    if (categorical[k]) d2 = a[k] === b[k] ? 0 : 1;
    else {
      const d = a[k]! - b[k]!;
      d2 = d * d;
    }
    r2 += d2 * inverseSquaredLengths[k]!;
  }
  return r2;
}

/** Unit-variance correlation at scaled squared distance r². */
export function correlation(kind: KernelKind, r2: number): number {
  if (kind === 'squared-exponential') return Math.exp(-0.5 * r2);
  // Matérn ν = 5/2 (Rasmussen & Williams 2006, Gaussian Processes for Machine Learning, eq. 4.17)
  const r = Math.sqrt(r2);
  return (1 + SQRT5 * r + (5 / 3) * r2) * Math.exp(-SQRT5 * r);
}
