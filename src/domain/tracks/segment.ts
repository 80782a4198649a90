/**
 * Flight-phase segmentation of a height trace sampled at uneven times: the ground level and the
 * measurement noise are estimated from the trace itself, then flights are the stretches above the
 * ground with hysteresis (enter above one height, leave below half of it).
 */

export interface TraceStatistics {
  /** Median sampling interval, s. */
  medianInterval: number;
  /** Gaps longer than `gapFactor` median intervals, and the longest gap, s. */
  gapCount: number;
  longestGap: number;
  /** Ground level (median height of the stance samples), m. */
  groundLevel: number;
  /** Noise standard deviation of the height at rest, m. */
  noiseSigma: number;
}

/** A gap longer than this many median sampling intervals counts as a dropout (common practice, no source). */
export const GAP_FACTOR = 3;

/** Every k-th index so that at most `limit` are visited. */
function strideFor(n: number, limit: number): number {
  return Math.max(1, Math.ceil(n / limit));
}

function medianOf(values: Float64Array, count: number): number {
  if (count === 0) return Number.NaN;
  const s = values.subarray(0, count).sort();
  const m = count >> 1;
  return count % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

const SAMPLE_LIMIT = 200_000;
const MAD_TO_SIGMA = 1 / 0.6744897501960817;

/**
 * Noise of `z` from the residual of each sample against the straight line through its neighbours,
 * scaled so that white noise of standard deviation σ gives σ. Only samples with `z ≤ below` and no gap
 * on either side enter.
 */
function interpolationNoise(t: Float64Array, z: Float64Array, below: number, maxInterval: number): number {
  const n = t.length;
  const stride = strideFor(n, SAMPLE_LIMIT);
  const residuals = new Float64Array(Math.ceil(n / stride) + 1);
  let count = 0;
  for (let i = 1; i + 1 < n; i += stride) {
    const z0 = z[i - 1]!, z1 = z[i]!, z2 = z[i + 1]!;
    if (z1 > below || z0 > below || z2 > below) continue;
    const d1 = t[i]! - t[i - 1]!;
    const d2 = t[i + 1]! - t[i]!;
    if (!(d1 > 0 && d2 > 0) || d1 > maxInterval || d2 > maxInterval) continue;
    const w0 = d2 / (d1 + d2);
    const w2 = 1 - w0;
    const r = (z1 - (w0 * z0 + w2 * z2)) / Math.sqrt(1 + w0 * w0 + w2 * w2);
    residuals[count++] = Math.abs(r);
  }
  return count >= 5 ? medianOf(residuals, count) * MAD_TO_SIGMA : Number.NaN;
}

/** Sampling interval, gaps, ground level and noise of a height trace (times increasing). */
export function traceStatistics(t: Float64Array, z: Float64Array, minimumBand: number): TraceStatistics {
  const n = t.length;
  const stride = strideFor(n, SAMPLE_LIMIT);
  const buffer = new Float64Array(Math.ceil(n / stride) + 1);
  let count = 0;
  for (let i = 1; i < n; i += stride) buffer[count++] = t[i]! - t[i - 1]!;
  const medianInterval = medianOf(buffer, count);
  let gapCount = 0;
  let longestGap = 0;
  const gapLimit = GAP_FACTOR * medianInterval;
  for (let i = 1; i < n; i++) {
    const d = t[i]! - t[i - 1]!;
    if (d > gapLimit) {
      gapCount++;
      if (d > longestGap) longestGap = d;
    }
  }
  // Low quantile of the heights: the bottom of the stance phases.
  count = 0;
  for (let i = 0; i < n; i += stride) buffer[count++] = z[i]!;
  const sorted = buffer.subarray(0, count).sort();
  const low = sorted[Math.floor(0.02 * (count - 1))]!;
  // First noise estimate over everything near the bottom, then the stance band, then a second estimate.
  const everywhere = interpolationNoise(t, z, Infinity, gapLimit);
  let band = Math.max(8 * (Number.isFinite(everywhere) ? everywhere : 0), minimumBand);
  let noise = interpolationNoise(t, z, low + band, gapLimit);
  if (!Number.isFinite(noise)) noise = Number.isFinite(everywhere) ? everywhere : 0;
  band = Math.max(8 * noise, minimumBand);
  count = 0;
  for (let i = 0; i < sorted.length && sorted[i]! <= low + band; i++) buffer[count++] = sorted[i]!;
  const groundLevel = medianOf(buffer, count);
  return { medianInterval, gapCount, longestGap, groundLevel, noiseSigma: noise };
}

export interface FlightSegment {
  /** First and one-past-last sample index. */
  start: number;
  end: number;
}

/**
 * Flight phases: stretches that rise above `ground + enter` and last until the height drops below
 * `ground + enter / 2`.
 */
export function flightSegments(z: Float64Array, ground: number, enter: number): FlightSegment[] {
  const segments: FlightSegment[] = [];
  const high = ground + enter;
  const low = ground + enter / 2;
  const n = z.length;
  let i = 0;
  while (i < n) {
    while (i < n && z[i]! <= high) i++;
    if (i >= n) break;
    // Extend backwards over samples above the exit level.
    let start = i;
    while (start > 0 && z[start - 1]! > low && (segments.length === 0 || start - 1 >= segments[segments.length - 1]!.end)) start--;
    while (i < n && z[i]! >= low) i++;
    segments.push({ start, end: i });
  }
  return segments;
}
