/**
 * Per-hop metrics from a motion track in SI units: flight phases are segmented, each is fitted with a
 * ballistic arc, and takeoff and landing are where the arc meets the ground level of the stance before
 * and after it.
 */
import { invalidInput } from '@/domain/errors';
import { STANDARD_GRAVITY, degrees } from '@/domain/metrics/ballistics';
import { arcCrossings, fitFlight, type FlightFit } from './fit';
import { groundAt, groundPlane } from './ground';
import { GAP_FACTOR, flightSegments, traceStatistics, type FlightSegment } from './segment';
import { medianOfRange } from './select';

export interface TrackSamples {
  /** Times in s, heights and positions in m. */
  t: Float64Array;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Optional tilt of the body from upright per sample, radians (NaN where unknown). */
  tilt?: Float64Array;
}

export interface HopOptions {
  /** Robot mass, kg; with `energyJ` gives energy per hop and cost of transport. */
  massKg?: number;
  /** Electrical energy drawn over the whole track, J. */
  energyJ?: number;
  /** Landing target, m (both or neither). */
  targetX?: number;
  targetY?: number;
  /** Height above the ground that starts a flight phase, m (default: max(6 σ, 2 mm)). */
  flightThresholdM?: number;
  /** Relative difference of the fitted gravity from 9.80665 m/s² that raises a warning (default 0.1). */
  gravityTolerance?: number;
}

export interface Hop {
  /** 1-based hop number. */
  index: number;
  takeoffTime: number;
  landingTime: number;
  flightTime: number;
  /** Ground contact after landing until the next takeoff, s (absent for the last hop). */
  stanceTime?: number;
  apexTime: number;
  /** Apex above the takeoff ground level, m. */
  apexHeight: number;
  /** Horizontal distance from takeoff point to landing point, m. */
  hopLength: number;
  takeoffSpeed: number;
  takeoffAngleDeg: number;
  /** Horizontal distance over time for the hop cycle (this takeoff to the next; the flight alone for the last hop), m/s. */
  horizontalSpeed: number;
  /** Horizontal distance of the hop cycle, m. */
  cycleDistance: number;
  takeoffX: number;
  takeoffY: number;
  landingX: number;
  landingY: number;
  /** Horizontal distance from the landing point to the target, m. */
  landingError?: number;
  /** √(apex of this hop / apex of the previous hop) (absent for the first hop). */
  restitution?: number;
  /** Gravity implied by the fitted arc, m/s². */
  fittedGravity: number;
  /** Root-mean-square height residual of the arc fit, m. */
  fitResidual: number;
  fitSamples: number;
  /** Equal share of the electrical energy, J. */
  energy?: number;
  /** energy / (m g cycleDistance). */
  costOfTransport?: number;
  /** Median tilt from upright over the stance before takeoff and after landing, degrees (with orientation). */
  takeoffTiltDeg?: number;
  landedTiltDeg?: number;
}

export interface TrackSummary {
  hopCount: number;
  sampleCount: number;
  duration: number;
  medianSamplingInterval: number;
  gapCount: number;
  longestGap: number;
  groundLevel: number;
  /** Inclination of the ground plane under the stance samples, degrees. */
  groundInclineDeg: number;
  noiseSigma: number;
  flightThreshold: number;
  meanApexHeight: number | null;
  maxApexHeight: number | null;
  meanHopLength: number | null;
  meanFlightTime: number | null;
  meanStanceTime: number | null;
  meanTakeoffSpeed: number | null;
  meanTakeoffAngleDeg: number | null;
  /** Sum of cycle distances over the time from the first takeoff to the last landing, m/s. */
  meanHorizontalSpeed: number | null;
  totalDistance: number;
  meanFittedGravity: number | null;
  meanRestitution: number | null;
  meanLandingError: number | null;
  energyPerHop: number | null;
  costOfTransport: number | null;
  /** Largest tilt after a landing, degrees (null without orientation). */
  maxLandedTiltDeg: number | null;
}

export interface TrackMetrics {
  hops: Hop[];
  summary: TrackSummary;
  warnings: string[];
}

const MIN_FIT_SAMPLES = 5;
/** Takeoff or landing may be extrapolated this many sampling intervals beyond the track (common practice, no source). */
const EDGE_INTERVALS = 2;
const MAX_LISTED = 5;

function mean(values: number[]): number | null {
  if (values.length === 0) return null;
  let s = 0;
  for (const v of values) s += v;
  return s / values.length;
}

function listed(items: string[]): string {
  return items.length <= MAX_LISTED ? items.join(', ') : `${items.slice(0, MAX_LISTED).join(', ')} and ${items.length - MAX_LISTED} more`;
}

/** Sort samples by time and drop repeated times, when needed; returns the samples and what was done. */
function orderedSamples(samples: TrackSamples): { samples: TrackSamples; reordered: boolean; duplicates: number } {
  const { t } = samples;
  let sorted = true;
  let strictly = true;
  for (let i = 1; i < t.length; i++) {
    if (t[i]! < t[i - 1]!) sorted = false;
    else if (t[i] === t[i - 1]) strictly = false;
  }
  if (sorted && strictly) return { samples, reordered: false, duplicates: 0 };
  const order = Array.from({ length: t.length }, (_, i) => i);
  if (!sorted) order.sort((a, b) => t[a]! - t[b]! || a - b);
  const keep: number[] = [];
  for (const i of order) if (keep.length === 0 || t[i]! > t[keep[keep.length - 1]!]!) keep.push(i);
  const pick = (a: Float64Array) => Float64Array.from(keep, (i) => a[i]!);
  return {
    samples: { t: pick(samples.t), x: pick(samples.x), y: pick(samples.y), z: pick(samples.z), tilt: samples.tilt ? pick(samples.tilt) : undefined },
    reordered: !sorted,
    duplicates: t.length - keep.length,
  };
}

interface Flight {
  segment: FlightSegment;
  fit: FlightFit;
}

// Scratch space reused across segments (long tracks have tens of thousands of flights).
let keepScratch = new Uint8Array(4096);
let residualScratch = new Float64Array(4096);

/** Fit one segment: the upper part of the arc, one pass of outlier rejection. */
function fitSegment(s: TrackSamples, height: Float64Array, segment: FlightSegment, ground: number, enter: number, noise: number): FlightFit | null {
  const { start, end } = segment;
  const t = s.t;
  const z = s.z;
  const length = end - start;
  if (keepScratch.length < length) {
    keepScratch = new Uint8Array(length * 2);
    residualScratch = new Float64Array(length * 2);
  }
  const keep = keepScratch;
  const residuals = residualScratch;
  // Fit the upper part of the arc: heights above the ground beyond the flight threshold and 10 % of the top.
  let top = -Infinity;
  for (let i = start; i < end; i++) if (height[i]! > top) top = height[i]!;
  const level = ground + Math.max(enter, 0.1 * (top - ground));
  let kept = 0;
  for (let i = start; i < end; i++) {
    const above = height[i]! > level ? 1 : 0;
    keep[i - start] = above;
    kept += above;
  }
  if (kept < MIN_FIT_SAMPLES) return null;
  let fit = fitFlight(t, s.x, s.y, z, start, end, keep);
  if (!fit) return null;
  // Outlier rejection: residuals beyond 5 robust standard deviations (or 5 σ of the noise).
  const { t0, a, b, c } = fit;
  let k = 0;
  for (let i = start; i < end; i++) {
    if (!keep[i - start]) continue;
    const tau = t[i]! - t0;
    residuals[k++] = Math.abs(z[i]! - (a + tau * (b + tau * c)));
  }
  const robust = medianOfRange(residuals, 0, kept) * 1.4826;
  const limit = 5 * Math.max(robust, noise, 1e-9);
  let removed = 0;
  k = 0;
  for (let i = start; i < end; i++) {
    if (!keep[i - start]) continue;
    if (residuals[k++]! > limit) {
      keep[i - start] = 0;
      removed++;
    }
  }
  if (removed > 0 && kept - removed >= MIN_FIT_SAMPLES) fit = fitFlight(t, s.x, s.y, z, start, end, keep) ?? fit;
  return fit;
}

/** Tipped over: a tilt beyond this after landing raises a warning, degrees (common practice, no source). */
const TIPPED_DEG = 60;

/** Median of the known (non-NaN) tilts in [from, to), degrees; undefined when none. */
function medianTiltDeg(tilt: Float64Array, from: number, to: number): number | undefined {
  const known: number[] = [];
  for (let i = from; i < to; i++) if (tilt[i] === tilt[i]) known.push(tilt[i]!);
  if (known.length === 0) return undefined;
  known.sort((a, b) => a - b);
  const m = known.length >> 1;
  return degrees(known.length % 2 ? known[m]! : (known[m - 1]! + known[m]!) / 2);
}

/** Largest time gap inside a segment: index after the gap, or -1 when none exceeds `limit`. */
function largestGap(t: Float64Array, segment: FlightSegment, limit: number): number {
  let at = -1;
  let widest = limit;
  for (let i = segment.start + 1; i < segment.end; i++) {
    const d = t[i]! - t[i - 1]!;
    if (d > widest) { widest = d; at = i; }
  }
  return at;
}

/** Per-hop metrics from samples in SI units. */
export function hopMetrics(input: TrackSamples, options: HopOptions = {}): TrackMetrics {
  const warnings: string[] = [];
  if (input.t.length < 10) {
    throw invalidInput('(body)', `the track has ${input.t.length} usable samples; at least 10 are needed (check the column mapping and blank cells)`);
  }
  const ordered = orderedSamples(input);
  const s = ordered.samples;
  if (ordered.reordered) warnings.push('the samples were not in time order; they were sorted by time');
  if (ordered.duplicates > 0) warnings.push(`${ordered.duplicates} samples repeated an earlier time and were skipped`);
  const n = s.t.length;
  const stats = traceStatistics(s.t, s.z, 0.001);
  const ground = stats.groundLevel;
  const noise = stats.noiseSigma;
  const enter = options.flightThresholdM ?? Math.max(6 * noise, 0.002);
  if (!(enter > 0)) throw invalidInput('flightThresholdM', 'flightThresholdM must be > 0 m');
  const gapLimit = GAP_FACTOR * stats.medianInterval;
  if (stats.gapCount > 0) {
    warnings.push(`${stats.gapCount} gaps longer than ${GAP_FACTOR} sampling intervals (longest ${stats.longestGap.toPrecision(3)} s); arcs spanning a gap are fitted from the samples on either side`);
  }

  // Fit each flight; a poor fit across a gap means a stance was lost in the gap: split there.
  const flights: Flight[] = [];
  let tooShort = 0;
  const notBallistic: string[] = [];
  // An inclined ground (a tilted plate): find flights above the plane under the stance samples.
  const plane = groundPlane(s.t, s.x, s.y, s.z, Math.max(6 * noise, 0.001), stats.medianInterval);
  const inclineDeg = degrees(Math.atan(Math.hypot(plane.slopeX, plane.slopeY)));
  let height = s.z;
  let base = ground;
  const inclined = plane.rise > enter;
  if (inclined) {
    height = new Float64Array(n);
    for (let i = 0; i < n; i++) height[i] = s.z[i]! - groundAt(plane, s.x[i]!, s.y[i]!);
    base = 0;
    warnings.push(`the ground is inclined by about ${inclineDeg.toFixed(1)}° (its height changes by ${(plane.rise * 1000).toFixed(0)} mm over the track); flights were found above the inclined ground`);
  }
  const pending = flightSegments(height, base, enter).reverse();
  while (pending.length > 0) {
    const segment = pending.pop()!;
    const fit = fitSegment(s, height, segment, base, enter, noise);
    const poor = !fit || !(fit.c < 0) || fit.rmsResidual > Math.max(4 * noise, 0.002);
    if (poor) {
      const gap = largestGap(s.t, segment, gapLimit);
      if (gap > 0) {
        pending.push({ start: gap, end: segment.end }, { start: segment.start, end: gap });
        continue;
      }
    }
    if (!fit) { tooShort++; continue; }
    if (!(fit.c < 0)) { notBallistic.push(`t ≈ ${s.t[segment.start]!.toFixed(3)} s`); continue; }
    flights.push({ segment, fit });
  }
  if (tooShort > 0) warnings.push(`${tooShort} short excursions above the ground had fewer than ${MIN_FIT_SAMPLES} samples in flight and were not counted as hops`);

  // Ground level of the stance before each flight and after the last.
  const stanceGround = (from: number, to: number, near: number): number => {
    if (to - from >= 3) return medianOfRange(s.z, from, to);
    return inclined ? groundAt(plane, s.x[near]!, s.y[near]!) : ground;
  };
  const hops: Hop[] = [];
  const gravityOff: string[] = [];
  const edgeCut: string[] = [];
  const tipped: string[] = [];
  const tolerance = options.gravityTolerance ?? 0.1;
  for (let k = 0; k < flights.length; k++) {
    const { segment, fit } = flights[k]!;
    const before = stanceGround(k > 0 ? flights[k - 1]!.segment.end : 0, segment.start, segment.start);
    const after = stanceGround(segment.end, k + 1 < flights.length ? flights[k + 1]!.segment.start : n, segment.end - 1);
    const up = arcCrossings(fit, before);
    const down = arcCrossings(fit, after);
    if (!up || !down) { notBallistic.push(`t ≈ ${s.t[segment.start]!.toFixed(3)} s`); continue; }
    // A flight whose takeoff or landing lies more than EDGE_INTERVALS sampling intervals outside the
    // track was cut by its start or end: the extrapolated crossing would be a guess.
    const edgeSlack = EDGE_INTERVALS * stats.medianInterval;
    if (up[0] < s.t[0]! - edgeSlack || down[1] > s.t[n - 1]! + edgeSlack) {
      edgeCut.push(`t ≈ ${s.t[segment.start]!.toFixed(3)} s`);
      continue;
    }
    const takeoffTime = up[0];
    const landingTime = down[1];
    const tauUp = takeoffTime - fit.t0;
    const tauDown = landingTime - fit.t0;
    const apexTau = -fit.b / (2 * fit.c);
    const apexZ = fit.a - (fit.b * fit.b) / (4 * fit.c);
    const takeoffX = fit.px + fit.qx * tauUp;
    const takeoffY = fit.py + fit.qy * tauUp;
    const landingX = fit.px + fit.qx * tauDown;
    const landingY = fit.py + fit.qy * tauDown;
    const verticalSpeed = fit.b + 2 * fit.c * tauUp;
    const horizontal = Math.hypot(fit.qx, fit.qy);
    const fittedGravity = -2 * fit.c;
    const index = hops.length + 1;
    if (Math.abs(fittedGravity - STANDARD_GRAVITY) > tolerance * STANDARD_GRAVITY) gravityOff.push(`hop ${index} (${fittedGravity.toPrecision(3)} m/s²)`);
    hops.push({
      index,
      takeoffTime,
      landingTime,
      flightTime: landingTime - takeoffTime,
      apexTime: fit.t0 + apexTau,
      apexHeight: apexZ - before,
      hopLength: Math.hypot(landingX - takeoffX, landingY - takeoffY),
      takeoffSpeed: Math.hypot(horizontal, verticalSpeed),
      takeoffAngleDeg: degrees(Math.atan2(verticalSpeed, horizontal)),
      horizontalSpeed: 0,
      cycleDistance: 0,
      takeoffX,
      takeoffY,
      landingX,
      landingY,
      fittedGravity,
      fitResidual: fit.rmsResidual,
      fitSamples: fit.samples,
    });
    if (s.tilt) {
      const hop = hops[hops.length - 1]!;
      const beforeTilt = medianTiltDeg(s.tilt, k > 0 ? flights[k - 1]!.segment.end : 0, segment.start);
      const afterTilt = medianTiltDeg(s.tilt, segment.end, k + 1 < flights.length ? flights[k + 1]!.segment.start : n);
      if (beforeTilt !== undefined) hop.takeoffTiltDeg = beforeTilt;
      if (afterTilt !== undefined) {
        hop.landedTiltDeg = afterTilt;
        if (afterTilt > TIPPED_DEG) tipped.push(`hop ${index} (${afterTilt.toFixed(0)}°)`);
      }
    }
  }
  if (notBallistic.length > 0) warnings.push(`phases at ${listed(notBallistic)} are not ballistic arcs (they do not curve downwards, or do not reach the stance level); they were not counted as hops`);
  if (tipped.length > 0) warnings.push(`the robot appears to have tipped over after ${listed(tipped)}: tilted more than ${TIPPED_DEG}° from upright in the following stance`);
  if (edgeCut.length > 0) warnings.push(`flights at ${listed(edgeCut)} are cut by the start or end of the track; they were not counted as hops`);
  if (gravityOff.length > 0) {
    warnings.push(`the fitted gravity differs from 9.80665 m/s² by more than ${Math.round(tolerance * 100)} % for ${listed(gravityOff)}; check the units, the marker, or non-ballistic forces (wings, tether)`);
  }

  // Hop cycles, stance, restitution, landing error.
  const targetGiven = options.targetX !== undefined || options.targetY !== undefined;
  if (targetGiven && (options.targetX === undefined || options.targetY === undefined)) {
    warnings.push('only one of targetX and targetY was given; give both to get landing errors');
  }
  const hasTarget = options.targetX !== undefined && options.targetY !== undefined;
  for (let k = 0; k < hops.length; k++) {
    const hop = hops[k]!;
    const next = hops[k + 1];
    if (next) {
      hop.stanceTime = next.takeoffTime - hop.landingTime;
      hop.cycleDistance = Math.hypot(next.takeoffX - hop.takeoffX, next.takeoffY - hop.takeoffY);
      hop.horizontalSpeed = hop.cycleDistance / (next.takeoffTime - hop.takeoffTime);
    } else {
      hop.cycleDistance = hop.hopLength;
      hop.horizontalSpeed = hop.hopLength / hop.flightTime;
    }
    const previous = hops[k - 1];
    if (previous && previous.apexHeight > 0 && hop.apexHeight >= 0) hop.restitution = Math.sqrt(hop.apexHeight / previous.apexHeight);
    if (hasTarget) hop.landingError = Math.hypot(hop.landingX - options.targetX!, hop.landingY - options.targetY!);
  }

  // Energy.
  const totalDistance = hops.reduce((a, h) => a + h.cycleDistance, 0);
  let energyPerHop: number | null = null;
  let summaryCost: number | null = null;
  const { massKg, energyJ } = options;
  if ((massKg === undefined) !== (energyJ === undefined)) warnings.push('give both the mass and the electrical energy to get energy per hop and cost of transport');
  if (energyJ !== undefined && (!Number.isFinite(energyJ) || energyJ < 0)) throw invalidInput('energyJoules', 'energyJoules must be a number ≥ 0');
  if (massKg !== undefined && (!Number.isFinite(massKg) || massKg <= 0)) throw invalidInput('massGrams', 'massGrams must be a number > 0');
  if (massKg !== undefined && energyJ !== undefined && hops.length > 0) {
    energyPerHop = energyJ / hops.length;
    for (const hop of hops) {
      hop.energy = energyPerHop;
      if (hop.cycleDistance > 0) hop.costOfTransport = energyPerHop / (massKg * STANDARD_GRAVITY * hop.cycleDistance);
    }
    if (totalDistance > 0) summaryCost = energyJ / (massKg * STANDARD_GRAVITY * totalDistance);
  }

  // Units that look wrong show up as a gravity off by a power of a thousand.
  const meanGravity = mean(hops.map((h) => h.fittedGravity));
  if (meanGravity !== null) {
    const ratio = meanGravity / STANDARD_GRAVITY;
    const near = (r: number) => ratio > 0.5 * r && ratio < 2 * r;
    if (near(1000)) warnings.push('the fitted gravity is about 1000 × too large: the lengths look like millimetres (set lengthUnit=mm) or the times like seconds given as ms');
    else if (near(0.001)) warnings.push('the fitted gravity is about 1000 × too small: the lengths look like metres given as mm');
    else if (near(1e6)) warnings.push('the fitted gravity is about 10⁶ × too large: the times look like seconds given as milliseconds (set timeUnit=s)');
    else if (near(1e-6)) warnings.push('the fitted gravity is about 10⁶ × too small: the times look like milliseconds (set timeUnit=ms)');
  }
  if (hops.length === 0) warnings.push('no complete hop was found: no flight phase rose clearly above the ground level');

  const first = hops[0];
  const last = hops[hops.length - 1];
  const withStance = hops.filter((h) => h.stanceTime !== undefined).map((h) => h.stanceTime!);
  const withRestitution = hops.filter((h) => h.restitution !== undefined).map((h) => h.restitution!);
  const summary: TrackSummary = {
    hopCount: hops.length,
    sampleCount: n,
    duration: s.t[n - 1]! - s.t[0]!,
    medianSamplingInterval: stats.medianInterval,
    gapCount: stats.gapCount,
    longestGap: stats.longestGap,
    groundLevel: inclined ? plane.level : ground,
    groundInclineDeg: inclineDeg,
    noiseSigma: noise,
    flightThreshold: enter,
    meanApexHeight: mean(hops.map((h) => h.apexHeight)),
    maxApexHeight: hops.length ? hops.reduce((m, h) => Math.max(m, h.apexHeight), -Infinity) : null,
    meanHopLength: mean(hops.map((h) => h.hopLength)),
    meanFlightTime: mean(hops.map((h) => h.flightTime)),
    meanStanceTime: mean(withStance),
    meanTakeoffSpeed: mean(hops.map((h) => h.takeoffSpeed)),
    meanTakeoffAngleDeg: mean(hops.map((h) => h.takeoffAngleDeg)),
    meanHorizontalSpeed: first && last ? totalDistance / (last.landingTime - first.takeoffTime) : null,
    totalDistance,
    meanFittedGravity: meanGravity,
    meanRestitution: mean(withRestitution),
    meanLandingError: hasTarget ? mean(hops.map((h) => h.landingError!)) : null,
    energyPerHop,
    costOfTransport: summaryCost,
    maxLandedTiltDeg: hops.some((h) => h.landedTiltDeg !== undefined)
      ? hops.reduce((m, h) => Math.max(m, h.landedTiltDeg ?? -Infinity), -Infinity)
      : null,
  };
  return { hops, summary, warnings };
}
