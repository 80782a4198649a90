/**
 * Power of a term's F test: the non-central F distribution function as a Poisson mixture of
 * regularised incomplete beta functions, summed outward from the Poisson mode until the terms vanish.
 */
// Johnson, Kotz & Balakrishnan (1995), Continuous Univariate Distributions vol. 2, ch. 30 (non-central F as a Poisson mixture)
import betainc from '@stdlib/math-base-special-betainc';
import gammaln from '@stdlib/math-base-special-gammaln';
import fQuantile from '@stdlib/stats-base-dists-f-quantile';

/** P(F ≤ f) for F ~ F'(d1, d2, λ). */
export function noncentralFCdf(f: number, d1: number, d2: number, lambda: number): number {
  if (!(f > 0)) return 0;
  if (!Number.isFinite(f)) return 1;
  const x = (d1 * f) / (d1 * f + d2);
  if (lambda <= 0) return betainc(x, d1 / 2, d2 / 2, true, false);
  const half = lambda / 2;
  const weight = (j: number) => Math.exp(-half + j * Math.log(half) - gammaln(j + 1));
  const mode = Math.floor(half);
  let sum = 0;
  for (let j = mode; ; j++) {
    const w = weight(j);
    sum += w * betainc(x, d1 / 2 + j, d2 / 2, true, false);
    if (w < 1e-16 && j > mode) break;
  }
  for (let j = mode - 1; j >= 0; j--) {
    const w = weight(j);
    sum += w * betainc(x, d1 / 2 + j, d2 / 2, true, false);
    if (w < 1e-16) break;
  }
  return Math.min(1, Math.max(0, sum));
}

/** Power of the level-α F test with (d1, d2) degrees of freedom at non-centrality λ. */
export function fTestPower(d1: number, d2: number, lambda: number, alpha: number): number {
  if (!(d2 > 0)) return NaN;
  const critical = fQuantile(1 - alpha, d1, d2);
  return 1 - noncentralFCdf(critical, d1, d2, lambda);
}
