/**
 * An inclined ground (a tilted plate): the least-squares plane z = level + slopeX (x − x0) +
 * slopeY (y − y0) through the "quiet" samples — those whose height stays within a band over ±40 ms
 * (the robot resting on the ground; an apex passes through the band far quicker) — refitted once
 * without outliers.
 */
export interface GroundPlane {
  level: number;
  slopeX: number;
  slopeY: number;
  x0: number;
  y0: number;
  /** Largest difference of the plane's height over the positions visited, m. */
  rise: number;
}

const SAMPLE_LIMIT = 200_000;
/** Below this spread of positions a slope along that axis is not estimated, m (common practice, no source). */
const MIN_SPREAD = 0.02;

/** Least-squares plane through the points flagged in `use` (x, y centred); slopes along thin axes are 0. */
function fitPlane(xs: Float64Array, ys: Float64Array, zs: Float64Array, use: Uint8Array, fitX: boolean, fitY: boolean, x0: number, y0: number) {
  let n = 0, sx = 0, sy = 0, sz = 0, sxx = 0, syy = 0, sxy = 0, sxz = 0, syz = 0;
  for (let i = 0; i < xs.length; i++) {
    if (!use[i]) continue;
    const u = fitX ? xs[i]! - x0 : 0;
    const v = fitY ? ys[i]! - y0 : 0;
    const w = zs[i]!;
    n++;
    sx += u; sy += v; sz += w;
    sxx += u * u; syy += v * v; sxy += u * v; sxz += u * w; syz += v * w;
  }
  if (n < 3) return null;
  // Centre the sums on the set's own means, then solve the 2 × 2 system for the slopes.
  const mx = sx / n, my = sy / n, mz = sz / n;
  const cxx = sxx - n * mx * mx, cyy = syy - n * my * my, cxy = sxy - n * mx * my;
  const cxz = sxz - n * mx * mz, cyz = syz - n * my * mz;
  let bx = 0, by = 0;
  if (fitX && fitY) {
    const det = cxx * cyy - cxy * cxy;
    if (det > 0) {
      bx = (cxz * cyy - cyz * cxy) / det;
      by = (cyz * cxx - cxz * cxy) / det;
    }
  } else if (fitX && cxx > 0) bx = cxz / cxx;
  else if (fitY && cyy > 0) by = cyz / cyy;
  return { level: mz - bx * mx - by * my, slopeX: bx, slopeY: by };
}

/** Half-width of the window over which a quiet sample keeps its height, s (common practice, no source). */
const QUIET_HALF_WINDOW = 0.04;

/**
 * The ground plane under a track (times increasing, median sampling interval `interval`). `band` is
 * the height change still counted as resting (a few noise standard deviations).
 */
export function groundPlane(t: Float64Array, x: Float64Array, y: Float64Array, z: Float64Array, band: number, interval: number): GroundPlane {
  const n = z.length;
  const k = Math.max(2, Math.ceil(QUIET_HALF_WINDOW / interval));
  const half = Math.max(1, k >> 1);
  const stride = Math.max(1, Math.ceil(n / SAMPLE_LIMIT));
  const m = Math.ceil(n / stride);
  const xs = new Float64Array(m), ys = new Float64Array(m), zs = new Float64Array(m);
  let count = 0;
  let x0 = 0, y0 = 0;
  let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (let i = k; i + k < n; i += stride) {
    const zi = z[i]!;
    if (Math.abs(z[i + k]! - zi) > band || Math.abs(z[i - k]! - zi) > band) continue;
    if (Math.abs(z[i + half]! - zi) > band || Math.abs(z[i - half]! - zi) > band) continue;
    if (t[i + k]! - t[i - k]! > 4 * k * interval) continue; // a gap: not known to be resting
    xs[count] = x[i]!; ys[count] = y[i]!; zs[count] = zi;
    x0 += x[i]!; y0 += y[i]!;
    if (x[i]! < xMin) xMin = x[i]!;
    if (x[i]! > xMax) xMax = x[i]!;
    if (y[i]! < yMin) yMin = y[i]!;
    if (y[i]! > yMax) yMax = y[i]!;
    count++;
  }
  if (count < 20) return { level: Number.NaN, slopeX: 0, slopeY: 0, x0: 0, y0: 0, rise: 0 };
  x0 /= count;
  y0 /= count;
  const fitX = xMax - xMin > MIN_SPREAD;
  const fitY = yMax - yMin > MIN_SPREAD;
  const qx = xs.subarray(0, count), qy = ys.subarray(0, count), qz = zs.subarray(0, count);
  const use = new Uint8Array(count).fill(1);
  let plane = fitPlane(qx, qy, qz, use, fitX, fitY, x0, y0);
  if (!plane) return { level: Number.NaN, slopeX: 0, slopeY: 0, x0: 0, y0: 0, rise: 0 };
  // Refit without outliers (a hover, a marker glitch): residuals beyond max(band, 3 robust SD).
  const residuals = new Float64Array(count);
  for (let i = 0; i < count; i++) residuals[i] = Math.abs(qz[i]! - (plane.level + plane.slopeX * (qx[i]! - x0) + plane.slopeY * (qy[i]! - y0)));
  const spread = 1.4826 * Float64Array.from(residuals).sort()[count >> 1]!;
  const limit = Math.max(band, 3 * spread);
  for (let i = 0; i < count; i++) use[i] = residuals[i]! <= limit ? 1 : 0;
  plane = fitPlane(qx, qy, qz, use, fitX, fitY, x0, y0) ?? plane;
  const rise = Math.abs(plane.slopeX) * (xMax - xMin) + Math.abs(plane.slopeY) * (yMax - yMin);
  return { level: plane.level, slopeX: plane.slopeX, slopeY: plane.slopeY, x0, y0, rise };
}

/** Ground height of the plane at (x, y). */
export function groundAt(plane: GroundPlane, x: number, y: number): number {
  return plane.level + plane.slopeX * (x - plane.x0) + plane.slopeY * (y - plane.y0);
}
