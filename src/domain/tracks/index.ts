/**
 * Motion tracks → per-hop metrics. `trackMetrics` takes a CSV text with a column mapping and units and
 * answers hops, a summary and warnings in SI units (s, m, m/s, degrees, J).
 */
import { invalidInput } from '@/domain/errors';
import { lengthFactor, timeFactor } from '@/domain/metrics/ballistics';
import { TrackCsvReader, type ParsedTrack } from './csv';
import { hopMetrics, type TrackMetrics } from './hops';

export type { Hop, HopOptions, TrackMetrics, TrackSamples, TrackSummary } from './hops';
export { hopMetrics } from './hops';
export { TrackCsvReader, parseTrackCsv, type ParsedTrack, type TrackColumns } from './csv';

export interface TrackMetricsOptions {
  /** Column names in the CSV header. */
  time: string;
  x: string;
  y: string;
  z: string;
  /** Unit of x, y, z and of the target coordinates. */
  lengthUnit: 'm' | 'mm' | 'cm';
  timeUnit: 's' | 'ms';
  massGrams?: number;
  energyJoules?: number;
  /** Landing target in `lengthUnit`. */
  targetX?: number;
  targetY?: number;
  /** Height above the ground that starts a flight phase, in `lengthUnit` (default: from the noise, at least 2 mm). */
  flightThreshold?: number;
  /** Relative deviation of the fitted gravity that raises a warning (default 0.1). */
  gravityTolerance?: number;
  /** Optional orientation columns, for the tilt from upright before takeoff and after landing. */
  orientation?: TrackOrientation;
}

/** Orientation as a quaternion (w, x, y, z; any norm) or as roll and pitch angles (yaw does not tilt). */
export type TrackOrientation =
  | { qw: string; qx: string; qy: string; qz: string }
  | { roll: string; pitch: string; angleUnit: 'deg' | 'rad' };

function orientationColumns(o: TrackOrientation | undefined): string[] {
  if (!o) return [];
  return 'qw' in o ? [o.qw, o.qx, o.qy, o.qz] : [o.roll, o.pitch];
}

/**
 * Tilt from upright, radians: the angle between the body's z axis and the vertical. For a quaternion
 * cos θ = 1 − 2 (qx² + qy²) / |q|²; for roll φ and pitch θ (yaw, pitch, roll order) cos = cos φ cos θ.
 */
export function tiltFromOrientation(o: TrackOrientation, extra: Float64Array[]): Float64Array {
  const n = extra[0]?.length ?? 0;
  const tilt = new Float64Array(n);
  if ('qw' in o) {
    const [w, x, y, z] = extra as [Float64Array, Float64Array, Float64Array, Float64Array];
    for (let i = 0; i < n; i++) {
      const norm = w[i]! * w[i]! + x[i]! * x[i]! + y[i]! * y[i]! + z[i]! * z[i]!;
      const c = 1 - (2 * (x[i]! * x[i]! + y[i]! * y[i]!)) / norm;
      tilt[i] = norm > 0 ? Math.acos(Math.max(-1, Math.min(1, c))) : Number.NaN;
    }
  } else {
    const [roll, pitch] = extra as [Float64Array, Float64Array];
    const k = o.angleUnit === 'deg' ? Math.PI / 180 : 1;
    for (let i = 0; i < n; i++) tilt[i] = Math.acos(Math.max(-1, Math.min(1, Math.cos(roll[i]! * k) * Math.cos(pitch[i]! * k))));
  }
  return tilt;
}

function checkedScales(options: TrackMetricsOptions): { lengthScale: number; timeScale: number } {
  const lengthScale = lengthFactor(options.lengthUnit, 'lengthUnit');
  const timeScale = timeFactor(options.timeUnit, 'timeUnit');
  if (options.massGrams !== undefined && !(Number.isFinite(options.massGrams) && options.massGrams > 0)) {
    throw invalidInput('massGrams', 'massGrams must be a number > 0 (grams)');
  }
  if (options.energyJoules !== undefined && !(Number.isFinite(options.energyJoules) && options.energyJoules >= 0)) {
    throw invalidInput('energyJoules', 'energyJoules must be a number ≥ 0 (joules)');
  }
  return { lengthScale, timeScale };
}

function metricsOfParsed(parsed: ParsedTrack, options: TrackMetricsOptions, lengthScale: number): TrackMetrics {
  const samples = options.orientation ? { ...parsed, tilt: tiltFromOrientation(options.orientation, parsed.extra) } : parsed;
  const result = hopMetrics(samples, {
    massKg: options.massGrams !== undefined ? options.massGrams / 1000 : undefined,
    energyJ: options.energyJoules,
    targetX: options.targetX !== undefined ? options.targetX * lengthScale : undefined,
    targetY: options.targetY !== undefined ? options.targetY * lengthScale : undefined,
    flightThresholdM: options.flightThreshold !== undefined ? options.flightThreshold * lengthScale : undefined,
    gravityTolerance: options.gravityTolerance,
  });
  if (parsed.droppedRows > 0) {
    result.warnings.unshift(`${parsed.droppedRows} of ${parsed.rows} rows had a blank or non-numeric cell in a mapped column and were skipped (dropouts)`);
  }
  return result;
}

/**
 * Per-hop metrics from a track CSV arriving in chunks (a file read piece by piece, a request stream).
 * `sizeHint`, the expected total bytes, lets the sample arrays be sized once.
 */
export function trackMetricsFromChunks(chunks: Iterable<Uint8Array>, options: TrackMetricsOptions, sizeHint?: number): TrackMetrics {
  const { lengthScale, timeScale } = checkedScales(options);
  const columns = { time: options.time, x: options.x, y: options.y, z: options.z, extra: orientationColumns(options.orientation) };
  const reader = new TrackCsvReader(columns, { timeScale, lengthScale, sizeHint });
  for (const chunk of chunks) reader.push(chunk);
  return metricsOfParsed(reader.finish(), options, lengthScale);
}

/** Per-hop metrics from a whole track CSV held as bytes. */
export function trackMetricsFromBytes(bytes: Uint8Array, options: TrackMetricsOptions): TrackMetrics {
  return trackMetricsFromChunks([bytes], options, bytes.length);
}

/** Per-hop metrics from a track CSV text; see `TrackMetricsOptions`. */
export function trackMetrics(csv: string, options: TrackMetricsOptions): TrackMetrics {
  return trackMetricsFromBytes(new TextEncoder().encode(csv), options);
}

/** Trial readings taken from a track, in the names the rig log and `checkReadings` use (SI units). */
export interface TrackReadings {
  /** Highest apex of the track's hops, m (null without hops). */
  apexHeightM: number | null;
  hopsCompleted: number;
  /** Horizontal distance travelled over the hop cycles, m. */
  distanceM: number;
}

/** The readings a trial takes from its track: highest apex, hops completed, distance travelled. */
export function readingsFromTrack(metrics: TrackMetrics): TrackReadings {
  return {
    apexHeightM: metrics.summary.maxApexHeight,
    hopsCompleted: metrics.summary.hopCount,
    distanceM: metrics.summary.totalDistance,
  };
}
