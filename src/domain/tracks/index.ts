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
  const result = hopMetrics(parsed, {
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
  const reader = new TrackCsvReader(options, { timeScale, lengthScale, sizeHint });
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
