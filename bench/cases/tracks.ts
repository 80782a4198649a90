/**
 * Track benchmark: a 10-million-sample motion-track CSV (an invented hopping scenario at 1 kHz, about
 * 20 000 hops) parsed and segmented into per-hop metrics, against pandas `read_csv` plus a vectorised
 * numpy segmentation of the same file in the same run. The file is generated once into the system temp
 * directory. A second pair of cases shows why the byte-level parser exists: papaparse on 1 M rows.
 */
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readSync, renameSync, statSync, writeSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Papa from 'papaparse';
import { randomNormal, seededRandom } from '../../src/domain/random';
import { parseTrackCsv, trackMetricsFromChunks, type TrackMetrics } from '../../src/domain/tracks';
import type { BenchCase } from '../types';

const G = 9.80665;
const dir = path.join(os.tmpdir(), 'saltus-bench');
const bigFile = path.join(dir, 'track-10M-v1.csv');
const smallFile = path.join(dir, 'track-1M-v1.csv');
const options = { time: 't', x: 'x', y: 'y', z: 'z', lengthUnit: 'm', timeUnit: 's' } as const;

/** Write `samples` rows of an invented hopping track at 1 kHz: stance, ballistic flight, noise 0.3 mm. */
function writeTrack(file: string, samples: number): void {
  if (existsSync(file) && statSync(file).size > samples * 20) return;
  mkdirSync(dir, { recursive: true });
  const rng = seededRandom(20260301);
  const tmp = `${file}.${process.pid}.tmp`;
  const fd = openSync(tmp, 'w');
  let chunk = 't,x,y,z\n';
  const ground = 0.012;
  let x = 0;
  let y = 0;
  let phaseEnd = 0;
  let flight = false;
  let takeoff = 0;
  let vx = 0, vy = 0, vz = 0;
  for (let i = 0; i < samples; i++) {
    const t = i / 1000;
    if (t >= phaseEnd) {
      if (flight) {
        // Land: the position stays where the arc ended.
        const tau = phaseEnd - takeoff;
        x += vx * tau;
        y += vy * tau;
        flight = false;
        phaseEnd += 0.1 + 0.2 * rng.next();
      } else {
        flight = true;
        takeoff = phaseEnd;
        const apex = 0.05 + 0.2 * rng.next();
        vz = Math.sqrt(2 * G * apex);
        vx = 0.4 * (rng.next() - 0.3);
        vy = 0.2 * (rng.next() - 0.5);
        phaseEnd = takeoff + (2 * vz) / G;
      }
    }
    let px = x, py = y, pz = ground;
    if (flight) {
      const tau = t - takeoff;
      px += vx * tau;
      py += vy * tau;
      pz += vz * tau - 0.5 * G * tau * tau;
    }
    pz += 0.0003 * randomNormal(rng);
    chunk += `${t.toFixed(3)},${px.toFixed(5)},${py.toFixed(5)},${pz.toFixed(5)}\n`;
    if (chunk.length > 1 << 20) {
      writeSync(fd, chunk);
      chunk = '';
    }
  }
  writeSync(fd, chunk);
  closeSync(fd);
  renameSync(tmp, file);
}

/** The file in 4 MiB pieces through one reused buffer, as a server would stream an upload. */
function* fileChunks(file: string): Generator<Uint8Array> {
  const fd = openSync(file, 'r');
  const buffer = Buffer.allocUnsafe(4 << 20);
  try {
    for (;;) {
      const got = readSync(fd, buffer, 0, buffer.length, null);
      if (got <= 0) return;
      yield buffer.subarray(0, got);
    }
  } finally {
    closeSync(fd);
  }
}

// Processor seconds per run, printed beside the wall-clock median: on a shared machine the wall clock
// of two runs made minutes apart can differ by the other load; processor time much less.
const cpuSeconds: number[] = [];

function timedRun(): TrackMetrics {
  const before = process.cpuUsage();
  const result = trackMetricsFromChunks(fileChunks(bigFile), options, statSync(bigFile).size);
  const used = process.cpuUsage(before);
  cpuSeconds.push((used.user + used.system) / 1e6);
  return result;
}

function hopsReport(_prepared: unknown, last: unknown) {
  const r = last as TrackMetrics;
  const sorted = cpuSeconds.slice(1).sort((a, b) => a - b);
  return {
    hops: r.summary.hopCount,
    meanApexM: r.summary.meanApexHeight ?? 0,
    meanGravity: r.summary.meanFittedGravity ?? 0,
    cpuSeconds: sorted[sorted.length >> 1] ?? 0,
  };
}

export const cases: BenchCase[] = [
  {
    name: 'tracks: 10M-sample CSV read, parsed and segmented',
    target: 'at least pandas read_csv + numpy segmentation throughput (ratio ≤ 1)',
    setup: () => writeTrack(bigFile, 10_000_000),
    run: timedRun,
    warmup: 1,
    repeats: 3,
    report: hopsReport,
    reference: { script: 'tracks_pandas.py', args: [bigFile, '3'], label: 'pandas read_csv + numpy segmentation', maxRatio: 1 },
  },
  {
    name: 'tracks: 1M-row CSV, byte-level parser (4 columns)',
    setup: () => {
      writeTrack(smallFile, 1_000_000);
      return readFileSync(smallFile);
    },
    run: (bytes) => parseTrackCsv(bytes as Buffer, options).length,
    repeats: 5,
    report: (_p, last) => ({ rows: last as number }),
  },
  {
    name: 'tracks: 1M-row CSV, papaparse with dynamic typing (why not)',
    setup: () => {
      writeTrack(smallFile, 1_000_000);
      return readFileSync(smallFile, 'utf8');
    },
    run: (text) => Papa.parse<Record<string, number>>(text as string, { header: true, dynamicTyping: true, skipEmptyLines: true }).data.length,
    repeats: 3,
    report: (_p, last) => ({ rows: last as number }),
  },
];
