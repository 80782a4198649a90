/**
 * Least-squares fits over a flight phase: z(τ) = a + b τ + c τ² and x(τ), y(τ) = p + q τ, with τ = t − t₀
 * centred on the phase for conditioning. Sums are gathered in one pass over typed arrays; the 3 × 3
 * normal equations are solved in closed form (Cramer's rule): a long track has tens of thousands of
 * flights, and a general matrix library's allocations per solve cost more than the solve (see the
 * 10M-sample case in bench/cases/tracks.ts).
 */

export interface FlightFit {
  /** Centre time t₀, s. */
  t0: number;
  /** z = a + b τ + c τ² (m, m/s, m/s²). */
  a: number;
  b: number;
  c: number;
  /** x = px + qx τ; y = py + qy τ. */
  px: number;
  qx: number;
  py: number;
  qy: number;
  /** Samples used and root-mean-square residual of z, m. */
  samples: number;
  rmsResidual: number;
}

/**
 * Fit the samples `indices[from..to)` (or all indices in [start, end) when `indices` is null) whose
 * `keep` flag is set. Returns null when fewer than 4 samples remain or the system is singular.
 */
export function fitFlight(
  t: Float64Array, x: Float64Array, y: Float64Array, z: Float64Array,
  start: number, end: number, keep: Uint8Array | null,
): FlightFit | null {
  let n = 0;
  let sumT = 0;
  let sumZ = 0;
  for (let i = start; i < end; i++) {
    if (keep && !keep[i - start]) continue;
    n++;
    sumT += t[i]!;
    sumZ += z[i]!;
  }
  if (n < 4) return null;
  const t0 = sumT / n;
  // Heights are centred too, so that a large offset of the capture volume costs no precision.
  const z0 = sumZ / n;
  let s1 = 0, s2 = 0, s3 = 0, s4 = 0, sz = 0, stz = 0, st2z = 0, sx = 0, stx = 0, sy = 0, sty = 0;
  for (let i = start; i < end; i++) {
    if (keep && !keep[i - start]) continue;
    const tau = t[i]! - t0;
    const tau2 = tau * tau;
    const zi = z[i]! - z0;
    s1 += tau;
    s2 += tau2;
    s3 += tau2 * tau;
    s4 += tau2 * tau2;
    sz += zi;
    stz += tau * zi;
    st2z += tau2 * zi;
    sx += x[i]!;
    stx += tau * x[i]!;
    sy += y[i]!;
    sty += tau * y[i]!;
  }
  // Normal equations [[n, s1, s2], [s1, s2, s3], [s2, s3, s4]] · (a, b, c) = (sz, stz, st2z).
  const m11 = s2 * s4 - s3 * s3;
  const m12 = s1 * s4 - s3 * s2;
  const m13 = s1 * s3 - s2 * s2;
  const det = n * m11 - s1 * m12 + s2 * m13;
  const scale = Math.abs(n * s2 * s4) || 1;
  if (!(Math.abs(det) > 1e-12 * scale)) return null;
  const a0 = (sz * m11 - s1 * (stz * s4 - s3 * st2z) + s2 * (stz * s3 - s2 * st2z)) / det;
  const b = (n * (stz * s4 - s3 * st2z) - sz * m12 + s2 * (s1 * st2z - stz * s2)) / det;
  const c = (n * (s2 * st2z - s3 * stz) - s1 * (s1 * st2z - s2 * stz) + sz * m13) / det;
  const a = a0 + z0;
  if (!(Number.isFinite(a) && Number.isFinite(b) && Number.isFinite(c))) return null;
  const lineDet = n * s2 - s1 * s1;
  if (!(lineDet > 0)) return null;
  const qx = (n * stx - s1 * sx) / lineDet;
  const px = (sx - qx * s1) / n;
  const qy = (n * sty - s1 * sy) / lineDet;
  const py = (sy - qy * s1) / n;
  let sse = 0;
  for (let i = start; i < end; i++) {
    if (keep && !keep[i - start]) continue;
    const tau = t[i]! - t0;
    const r = z[i]! - (a + tau * (b + tau * c));
    sse += r * r;
  }
  return { t0, a, b, c, px, qx, py, qy, samples: n, rmsResidual: Math.sqrt(sse / n) };
}

/** Height of the fitted arc at time t. */
export function arcHeight(fit: FlightFit, t: number): number {
  const tau = t - fit.t0;
  return fit.a + tau * (fit.b + tau * fit.c);
}

/**
 * Times where the fitted arc crosses `level` (rising, falling), or null when the arc does not reach it
 * or opens upwards.
 */
export function arcCrossings(fit: FlightFit, level: number): [number, number] | null {
  const { a, b, c } = fit;
  if (!(c < 0)) return null;
  const disc = b * b - 4 * c * (a - level);
  if (!(disc >= 0)) return null;
  const root = Math.sqrt(disc);
  // c < 0: (−b + √disc) / 2c is the earlier root. Use the stable form to avoid cancellation.
  const q = -0.5 * (b + Math.sign(b || 1) * root);
  const r1 = q / c;
  const r2 = q !== 0 ? (a - level) / q : -r1;
  return [fit.t0 + Math.min(r1, r2), fit.t0 + Math.max(r1, r2)];
}
