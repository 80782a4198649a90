/**
 * Expected improvement and its logarithm, computed stably far into the tail where EI itself
 * underflows to zero (so candidates can still be ranked there).
 */
// Jones, Schonlau & Welch (1998), J. Global Optimization 13:455-492 (expected improvement)
import normalCdfImpl from '@stdlib/stats-base-dists-normal-cdf';
import normalPdfImpl from '@stdlib/stats-base-dists-normal-pdf';

const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

export function standardNormalCdf(z: number): number {
  return normalCdfImpl(z, 0, 1);
}

export function standardNormalPdf(z: number): number {
  return normalPdfImpl(z, 0, 1);
}

/** Mills ratio R(t) = Φ(−t) / φ(t) for t ≥ 1, by its continued fraction (evaluated by Lentz's method). */
function millsRatio(t: number): number {
  // R(t) = 1 / (t + 1 / (t + 2 / (t + 3 / (t + ...))))
  const tiny = 1e-300;
  let f = t;
  let c = t;
  let dd = 0;
  for (let k = 1; k < 500; k++) {
    dd = t + k * dd;
    dd = Math.abs(dd) < tiny ? tiny : dd;
    c = t + k / c;
    c = Math.abs(c) < tiny ? tiny : c;
    dd = 1 / dd;
    const delta = c * dd;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return 1 / f;
}

/**
 * log h(z), h(z) = φ(z) + z Φ(z) = E[max(Z + z, 0)] for standard normal Z. Direct for z > −1; for z ≤ −1,
 * h(z) = φ(z) (1 − |z| R(|z|)), with the asymptotic series 1/z² − 3/z⁴ + … far in the tail.
 */
// Ament, Daulton, Eriksson, Balandat & Bakshy (2023), NeurIPS, "Unexpected improvements to expected improvement"
export function logExpectedImprovementFactor(z: number): number {
  if (z > -1) return Math.log(standardNormalPdf(z) + z * standardNormalCdf(z));
  const t = -z;
  const logPhi = -0.5 * t * t - HALF_LOG_2PI;
  let tail: number;
  if (t > 20) {
    const u = 1 / (t * t);
    tail = u * (1 - 3 * u * (1 - 5 * u * (1 - 7 * u * (1 - 9 * u))));
  } else {
    tail = 1 - t * millsRatio(t);
  }
  return logPhi + Math.log(tail);
}

/** EI for maximisation of a normal prediction (mean, sd) over the incumbent `best`: sd·h((mean − best)/sd). */
export function expectedImprovement(mean: number, sd: number, best: number): number {
  if (!(sd > 0)) return Math.max(0, mean - best);
  const z = (mean - best) / sd;
  return sd * (standardNormalPdf(z) + z * standardNormalCdf(z));
}

/** log EI, finite wherever sd > 0. */
export function logExpectedImprovement(mean: number, sd: number, best: number): number {
  if (!(sd > 0)) return mean > best ? Math.log(mean - best) : -Infinity;
  return Math.log(sd) + logExpectedImprovementFactor((mean - best) / sd);
}
