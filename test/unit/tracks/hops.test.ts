import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { hopMetrics, readingsFromTrack, trackMetrics } from '@/domain/tracks';
import { checkReadings } from '@/domain/metrics/plausibility';
import { flightTimeForApex, takeoffSpeedForApex } from '@/domain/metrics/ballistics';
import { syntheticTrack, type SyntheticHop } from './synthetic';

const mapping = { time: 'time', x: 'pos_x', y: 'pos_y', z: 'pos_z', lengthUnit: 'm', timeUnit: 's' } as const;

const threeHops: SyntheticHop[] = [
  { apexHeight: 0.2, vx: 0.3, vy: 0.1, stanceBefore: 0.3 },
  { apexHeight: 0.1, vx: 0.2, vy: 0, stanceBefore: 0.15 },
  { apexHeight: 0.05, vx: -0.1, vy: 0.05, stanceBefore: 0.1 },
];

describe('track metrics on synthetic ballistic tracks (known parameters)', () => {
  it('recovers a clean track almost exactly', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 1000 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(3);
    expect(r.warnings).toEqual([]);
    r.hops.forEach((hop, k) => {
      const truth = track.truth[k]!;
      expect(hop.index).toBe(k + 1);
      expect(hop.apexHeight).toBeCloseTo(truth.apexHeight, 5);
      expect(hop.takeoffTime).toBeCloseTo(truth.takeoffTime, 4);
      expect(hop.landingTime).toBeCloseTo(truth.landingTime, 4);
      expect(hop.hopLength).toBeCloseTo(truth.hopLength, 4);
      expect(hop.takeoffSpeed).toBeCloseTo(truth.takeoffSpeed, 3);
      expect(hop.takeoffAngleDeg).toBeCloseTo(truth.takeoffAngleDeg, 2);
      expect(hop.fittedGravity).toBeCloseTo(9.80665, 3);
    });
    // The ballistic relations: a 0.20 m apex needs 1.98 m/s vertical and about 0.40 s of flight (common practice, no source).
    expect(r.hops[0]!.flightTime).toBeCloseTo(0.40, 2);
    expect(r.hops[0]!.flightTime).toBeCloseTo(flightTimeForApex(0.2), 4);
    expect(Math.sqrt(r.hops[0]!.takeoffSpeed ** 2 - (0.3 ** 2 + 0.1 ** 2))).toBeCloseTo(takeoffSpeedForApex(0.2), 3);
    // Stance, restitution, horizontal speed over the cycle.
    expect(r.hops[0]!.stanceTime).toBeCloseTo(0.15, 4);
    expect(r.hops[1]!.stanceTime).toBeCloseTo(0.1, 4);
    expect(r.hops[2]!.stanceTime).toBeUndefined();
    expect(r.hops[1]!.restitution).toBeCloseTo(Math.sqrt(0.5), 4);
    expect(r.hops[0]!.restitution).toBeUndefined();
    const cycle = track.truth[1]!.takeoffTime - track.truth[0]!.takeoffTime;
    expect(r.hops[0]!.horizontalSpeed).toBeCloseTo(track.truth[0]!.hopLength / cycle, 4);
    expect(r.summary.hopCount).toBe(3);
    expect(r.summary.groundLevel).toBeCloseTo(0.012, 6);
    expect(r.summary.totalDistance).toBeCloseTo(track.truth.reduce((a, h) => a + h.hopLength, 0), 4);
  });

  it('gives landing errors, energy per hop and cost of transport E/(m g d)', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    const r = trackMetrics(track.csv, { ...mapping, massGrams: 1.5, energyJoules: 0.6, targetX: 0.25, targetY: 0.25 });
    const last = track.truth[2]!;
    expect(r.hops[2]!.landingError).toBeCloseTo(Math.hypot(last.landingX - 0.25, last.landingY - 0.25), 4);
    expect(r.hops[0]!.energy).toBeCloseTo(0.2, 12);
    expect(r.summary.energyPerHop).toBeCloseTo(0.2, 12);
    expect(r.summary.costOfTransport).toBeCloseTo(0.6 / (0.0015 * 9.80665 * r.summary.totalDistance), 8);
    expect(r.hops[0]!.costOfTransport).toBeCloseTo(0.2 / (0.0015 * 9.80665 * r.hops[0]!.cycleDistance), 8);
    expect(r.summary.meanLandingError).not.toBeNull();
  });

  it('hands the trial its readings (highest apex, hops, distance), which pass the plausibility checks', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    const readings = readingsFromTrack(trackMetrics(track.csv, mapping));
    expect(readings.hopsCompleted).toBe(3);
    expect(readings.apexHeightM).toBeCloseTo(0.2, 4);
    expect(readings.distanceM).toBeCloseTo(track.truth.reduce((a, h) => a + h.hopLength, 0), 4);
    expect(checkReadings({ ...readings, energyJ: 0.5, passed: true }, { now: '2026-03-01T12:00:00Z', robotMassKg: 0.001, robotHeightM: 0.02 })).toEqual({ errors: [], warnings: [] });
  });

  it('reads millimetres and milliseconds and answers in SI', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, lengthScale: 1000, timeScale: 1000 });
    const r = trackMetrics(track.csv, { ...mapping, lengthUnit: 'mm', timeUnit: 'ms', targetX: 250, targetY: 250 });
    expect(r.hops).toHaveLength(3);
    expect(r.hops[0]!.apexHeight).toBeCloseTo(0.2, 4);
    expect(r.hops[0]!.flightTime).toBeCloseTo(track.truth[0]!.landingTime - track.truth[0]!.takeoffTime, 3);
    expect(r.hops[2]!.landingError).toBeCloseTo(Math.hypot(track.truth[2]!.landingX - 0.25, track.truth[2]!.landingY - 0.25), 3);
  });

  it('warns when the units look wrong (gravity 1000 times too large)', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, lengthScale: 1000 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.warnings.join(' ')).toMatch(/lengthUnit=mm/);
  });

  it('warns when the fitted gravity is off (a tether or wings)', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, gravity: 7 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(3);
    expect(r.hops[0]!.fittedGravity).toBeCloseTo(7, 3);
    expect(r.warnings.join(' ')).toMatch(/fitted gravity differs from 9.80665/);
  });

  it('splits two hops whose stance between them fell into a dropout', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    // Remove every sample from shortly before the first landing to shortly after the second takeoff.
    const lines = track.csv.trim().split('\n');
    const a = track.truth[0]!.landingTime - 0.02;
    const b = track.truth[1]!.takeoffTime + 0.02;
    const kept = lines.filter((line, i) => i === 0 || !(Number(line.split(',')[0]) > a && Number(line.split(',')[0]) < b));
    const r = trackMetrics(kept.join('\n'), mapping);
    expect(r.hops).toHaveLength(3);
    expect(r.hops[0]!.apexHeight).toBeCloseTo(0.2, 3);
    expect(r.hops[1]!.apexHeight).toBeCloseTo(0.1, 3);
    expect(r.warnings.join(' ')).toMatch(/gaps longer than/);
  });

  it('does not count a flight cut by the start of the track, and says so', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    const lines = track.csv.trim().split('\n');
    const cut = lines.filter((line, i) => i === 0 || Number(line.split(',')[0]) > 0.45);
    const r = trackMetrics(cut.join('\n'), mapping);
    expect(r.hops).toHaveLength(2);
    expect(r.warnings.join(' ')).toMatch(/cut by the start or end/);
  });

  it('counts a last hop whose landing falls just after the final sample', () => {
    // Three 0.10 m hops at 200 Hz; the track ends a few milliseconds before the last landing.
    const rows = ['t,x,y,z'];
    const v = Math.sqrt(2 * 9.80665 * 0.1);
    const flight = (2 * v) / 9.80665;
    let start = 0;
    for (let k = 0; k < 3; k++) {
      for (let i = 0; i < 12; i++) rows.push(`${(start + i / 200).toFixed(4)},${(0.1 * k).toFixed(4)},0,0`);
      start += 0.06;
      for (let i = 0; i < Math.floor(flight * 200); i++) {
        const s = i / 200;
        rows.push(`${(start + s).toFixed(4)},${(0.1 * k + 0.25 * s).toFixed(4)},0,${Math.max(0, v * s - 4.903325 * s * s).toFixed(5)}`);
      }
      start += flight;
    }
    const r = trackMetrics(rows.join('\n'), { time: 't', x: 'x', y: 'y', z: 'z', lengthUnit: 'm', timeUnit: 's' });
    expect(r.hops).toHaveLength(3);
    expect(r.hops[2]!.apexHeight).toBeCloseTo(0.1, 3);
    expect(r.hops[2]!.flightTime).toBeCloseTo(flight, 3);
  });

  it('handles absolute epoch times (16 significant digits) and a capture volume far from the origin', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, noise: 0.0002, start: { x: 250.1, y: -40.2, t: 1_750_000_000.5 } });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(3);
    r.hops.forEach((hop, k) => {
      const truth = track.truth[k]!;
      expect(Math.abs(hop.takeoffTime - truth.takeoffTime)).toBeLessThan(0.0015);
      expect(Math.abs(hop.apexHeight - truth.apexHeight)).toBeLessThan(0.001);
      expect(Math.abs(hop.hopLength - truth.hopLength)).toBeLessThan(0.0015);
    });
  });

  it('reads optional orientation (quaternion or roll/pitch) and flags a robot that tipped over', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    const [head, ...rows] = track.csv.trim().split('\n');
    const lastLanding = track.truth[2]!.landingTime;
    // Upright throughout, except lying on its side (90° roll) after the last landing; some cells blank.
    const withQuaternion = [`${head},qw,qx,qy,qz`, ...rows.map((row, i) => {
      const t = Number(row.split(',')[0]);
      const half = t > lastLanding + 0.05 ? Math.PI / 4 : 0;
      return i % 50 === 7 ? `${row},,,,` : `${row},${Math.cos(half)},${Math.sin(half)},0,0`;
    })].join('\n');
    const q = trackMetrics(withQuaternion, { ...mapping, orientation: { qw: 'qw', qx: 'qx', qy: 'qy', qz: 'qz' } });
    expect(q.hops).toHaveLength(3);
    expect(q.hops[0]!.takeoffTiltDeg).toBeCloseTo(0, 6);
    expect(q.hops[0]!.landedTiltDeg).toBeCloseTo(0, 6);
    expect(q.hops[2]!.landedTiltDeg).toBeGreaterThan(80);
    expect(q.summary.maxLandedTiltDeg).toBeGreaterThan(80);
    expect(q.warnings.join(' ')).toMatch(/tipped over after hop 3/);
    const withAngles = [`${head},roll_deg,pitch_deg,yaw_deg`, ...rows.map((row) => `${row},3,4,170`)].join('\n');
    const a = trackMetrics(withAngles, { ...mapping, orientation: { roll: 'roll_deg', pitch: 'pitch_deg', angleUnit: 'deg' } });
    const expected = (Math.acos(Math.cos((3 * Math.PI) / 180) * Math.cos((4 * Math.PI) / 180)) * 180) / Math.PI;
    expect(a.hops[1]!.landedTiltDeg).toBeCloseTo(expected, 6);
    expect(a.warnings.join(' ')).not.toMatch(/tipped/);
    expect(trackMetrics(track.csv, mapping).summary.maxLandedTiltDeg).toBeNull();
  });

  it('sorts samples given out of time order', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500 });
    const [head, ...rows] = track.csv.trim().split('\n');
    const shuffledRows = rows.slice().reverse();
    const r = trackMetrics([head, ...shuffledRows].join('\n'), mapping);
    expect(r.hops).toHaveLength(3);
    expect(r.warnings.join(' ')).toMatch(/sorted by time/);
  });

  it('stays within tolerance when the marker dips in stance (leg compression)', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, noise: 0.0003, stanceDip: 0.002, seed: 7 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(3);
    r.hops.forEach((hop, k) => {
      const truth = track.truth[k]!;
      expect(Math.abs(hop.apexHeight - truth.apexHeight)).toBeLessThan(0.003 + 0.02 * truth.apexHeight);
      expect(Math.abs(hop.takeoffTime - truth.takeoffTime)).toBeLessThan(0.004);
      expect(Math.abs(hop.landingTime - truth.landingTime)).toBeLessThan(0.004);
    });
  });

  it('finds the hops on an inclined ground (a tilted plate) and reports the incline', () => {
    // Six hops travelling 0.1-0.15 m each up a 10° slope: the ground rises by about 12 cm.
    const hops = Array.from({ length: 6 }, (_, k) => ({ apexHeight: 0.08 + 0.01 * k, vx: 0.35, vy: 0, stanceBefore: 0.15 }));
    const slope = Math.tan((10 * Math.PI) / 180);
    const track = syntheticTrack({ hops, sampleRate: 500, noise: 0.0003, slopeX: slope, seed: 5 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(6);
    expect(r.summary.groundInclineDeg).toBeCloseTo(10, 0);
    expect(r.warnings.join(' ')).toMatch(/inclined by about 10/);
    r.hops.forEach((hop, k) => {
      const truth = track.truth[k]!;
      expect(Math.abs(hop.apexHeight - truth.apexHeight)).toBeLessThan(0.002);
      expect(Math.abs(hop.takeoffTime - truth.takeoffTime)).toBeLessThan(0.002);
      expect(Math.abs(hop.landingTime - truth.landingTime)).toBeLessThan(0.002);
      expect(Math.abs(hop.hopLength - truth.hopLength)).toBeLessThan(0.002);
    });
    // Flat ground: no incline reported.
    const flat = trackMetrics(syntheticTrack({ hops, sampleRate: 500, noise: 0.0003, seed: 5 }).csv, mapping);
    expect(flat.summary.groundInclineDeg).toBeLessThan(0.5);
    expect(flat.warnings.join(' ')).not.toMatch(/inclined/);
  });

  it('ignores isolated marker glitches in stance and in flight', () => {
    const track = syntheticTrack({ hops: threeHops, sampleRate: 500, noise: 0.0003, spikes: 0.004, seed: 11 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toHaveLength(3);
    r.hops.forEach((hop, k) => {
      expect(Math.abs(hop.apexHeight - track.truth[k]!.apexHeight)).toBeLessThan(0.003);
      expect(Math.abs(hop.fittedGravity - 9.80665)).toBeLessThan(0.3);
    });
  });

  it('does not count a phase that curves upwards (the robot lifted by hand) as a hop', () => {
    const n = 600;
    const t = Float64Array.from({ length: n }, (_, i) => i / 200);
    // Ground at 0.01 m; between 1 s and 2 s the height follows an upward-curving bowl 5-10 cm up.
    const z = Float64Array.from(t, (s) => (s > 1 && s < 2 ? 0.06 + 0.2 * (s - 1.5) ** 2 : 0.01));
    const zeros = new Float64Array(n);
    const r = hopMetrics({ t, x: zeros, y: zeros, z });
    expect(r.hops).toEqual([]);
    expect(r.warnings.join(' ')).toMatch(/not ballistic arcs/);
  });

  it('reports no hops for a robot that never leaves the ground', () => {
    const track = syntheticTrack({ hops: [], finalStance: 1, noise: 0.0003 });
    const r = trackMetrics(track.csv, mapping);
    expect(r.hops).toEqual([]);
    expect(r.summary.meanApexHeight).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/no complete hop/);
  });

  it('refuses a track with too few usable samples and bad units', () => {
    expect(() => trackMetrics('time,pos_x,pos_y,pos_z\n0,0,0,0\n', mapping)).toThrow(/at least 10/);
    expect(() => trackMetrics('time,pos_x,pos_y,pos_z\n0,0,0,0\n', { ...mapping, lengthUnit: 'in' as never })).toThrow(/lengthUnit/);
    expect(() => trackMetrics('time,pos_x,pos_y,pos_z\n0,0,0,0\n', { ...mapping, massGrams: -1 })).toThrow(/massGrams/);
  });

  // Stated tolerances with noise σ ≤ 0.5 mm, 250-1000 Hz sampling with ±30 % jitter and up to 5 % dropped
  // rows: apex within 1 mm, takeoff and landing times within 1.5 ms, hop length within 1.5 mm (about three
  // times the worst error seen over 300 such tracks).
  it('recovers apex, length and times within the stated tolerances under noise, uneven sampling and dropouts', () => {
    const hopArb = fc.record({
      apexHeight: fc.double({ min: 0.03, max: 0.3, noNaN: true }),
      vx: fc.double({ min: -0.5, max: 0.5, noNaN: true }),
      vy: fc.double({ min: -0.5, max: 0.5, noNaN: true }),
      stanceBefore: fc.double({ min: 0.08, max: 0.4, noNaN: true }),
    });
    fc.assert(
      fc.property(
        fc.array(hopArb, { minLength: 1, maxLength: 4 }),
        fc.integer({ min: 250, max: 1000 }),
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        fc.double({ min: 0, max: 0.0005, noNaN: true }),
        fc.double({ min: 0, max: 0.05, noNaN: true }),
        fc.integer({ min: 1, max: 1_000_000 }),
        (hops, sampleRate, jitter, noise, dropout, seed) => {
          const track = syntheticTrack({ hops, sampleRate, jitter, noise, dropout, seed });
          const r = trackMetrics(track.csv, mapping);
          expect(r.hops).toHaveLength(hops.length);
          r.hops.forEach((hop, k) => {
            const truth = track.truth[k]!;
            expect(Math.abs(hop.apexHeight - truth.apexHeight)).toBeLessThan(0.001);
            expect(Math.abs(hop.takeoffTime - truth.takeoffTime)).toBeLessThan(0.0015);
            expect(Math.abs(hop.landingTime - truth.landingTime)).toBeLessThan(0.0015);
            expect(Math.abs(hop.hopLength - truth.hopLength)).toBeLessThan(0.0015);
          });
        },
      ),
      { numRuns: 60, seed: 20260303 },
    );
  });
});
