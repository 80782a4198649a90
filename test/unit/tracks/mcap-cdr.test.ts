/**
 * MCAP logs with CDR-encoded ROS 2 pose messages and compressed chunks. Logs are built in the test
 * with @mcap/core's writer (CDR encoded by the test's own writer; lz4 chunks by lz4js' compressor,
 * zstd chunks as raw-block zstd frames), and read from fixtures whose chunks were compressed by the
 * reference zstd and lz4 command-line tools (test/fixtures/mcap-compressed/SOURCE.md).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { compress as lz4Compress } from 'lz4js';
import { describe, expect, it } from 'vitest';
import { listMcapTopics, mcapTrackMetrics, readMcapPoses } from '@/domain/tracks/mcap';
import {
  BASE_TIME, BODY_STATE_SCHEMA, COMPRESSED_FIXTURE_TRACK, POSE_STAMPED_SCHEMA, TRANSFORM_STAMPED_SCHEMA,
  buildCdrMcap, encodeBodyState, encodePoseStamped, encodeTransformStamped, samplesOf, zstdRawFrame,
} from './mcap-build';
import { syntheticTrack } from './synthetic';

const track = syntheticTrack({
  hops: [
    { apexHeight: 0.12, vx: 0.25, vy: 0, stanceBefore: 0.2 },
    { apexHeight: 0.08, vx: 0.2, vy: 0.05, stanceBefore: 0.12 },
  ],
  sampleRate: 250,
  noise: 0.0002,
  seed: 4,
});
const samples = samplesOf(track);

const pose = { schemaName: 'geometry_msgs/msg/PoseStamped', schema: POSE_STAMPED_SCHEMA, encode: (s: (typeof samples)[number]) => encodePoseStamped(s) };

function expectTrack(bytes: Uint8Array) {
  const poses = readMcapPoses(bytes, '/hopper/pose');
  expect(poses.length).toBe(samples.length);
  expect(poses.timeOrigin).toBeCloseTo(BASE_TIME + samples[0]!.t, 3);
  expect(poses.z[37]).toBeCloseTo(samples[37]!.z, 6);
  expect(poses.x[37]).toBeCloseTo(samples[37]!.x, 6);
  expect(poses.t[200]).toBeCloseTo(samples[200]!.t - samples[0]!.t, 6);
  const r = mcapTrackMetrics(bytes, '/hopper/pose');
  expect(r.hops).toHaveLength(2);
  expect(r.hops[0]!.apexHeight).toBeCloseTo(0.12, 2);
  expect(r.hops[1]!.apexHeight).toBeCloseTo(0.08, 2);
  return r;
}

describe('MCAP with CDR pose messages', () => {
  it('reads geometry_msgs/msg/PoseStamped, time from the header stamp', async () => {
    expectTrack(await buildCdrMcap(samples, pose));
  });

  it('reads big-endian CDR', async () => {
    expectTrack(await buildCdrMcap(samples, { ...pose, encode: (s) => encodePoseStamped(s, false) }));
  });

  it('reads geometry_msgs/msg/TransformStamped (the translation)', async () => {
    expectTrack(await buildCdrMcap(samples, { schemaName: 'geometry_msgs/msg/TransformStamped', schema: TRANSFORM_STAMPED_SCHEMA, encode: (s) => encodeTransformStamped(s) }));
  });

  it('reads a custom message with x, y, z fields (float32) and a time field t', async () => {
    const bytes = await buildCdrMcap(samples, { schemaName: 'hopper_msgs/msg/BodyState', schema: BODY_STATE_SCHEMA, encode: (s, i) => encodeBodyState(s, i) });
    const poses = readMcapPoses(bytes, '/hopper/pose');
    expect(poses.length).toBe(samples.length);
    expect(poses.z[37]).toBeCloseTo(samples[37]!.z, 6);
    const r = mcapTrackMetrics(bytes, '/hopper/pose');
    expect(r.hops).toHaveLength(2);
    expect(r.hops[0]!.apexHeight).toBeCloseTo(0.12, 2);
  });

  it('skips (and counts) messages cut short, keeping the rest', async () => {
    const bytes = await buildCdrMcap(samples, { ...pose, encode: (s, i) => (i === 10 ? encodePoseStamped(s).subarray(0, 20) : encodePoseStamped(s)) });
    const poses = readMcapPoses(bytes, '/hopper/pose');
    expect(poses.skipped).toBe(1);
    expect(poses.length).toBe(samples.length - 1);
  });

  it('lists topics with their schema names and message counts', async () => {
    const bytes = await buildCdrMcap(samples, pose);
    expect(listMcapTopics(bytes)).toEqual([
      { topic: '/hopper/battery', schemaName: '', schemaEncoding: '', messageEncoding: 'json', messages: Math.ceil(samples.length / 50) },
      { topic: '/hopper/pose', schemaName: 'geometry_msgs/msg/PoseStamped', schemaEncoding: 'ros2msg', messageEncoding: 'cdr', messages: samples.length },
    ]);
  });

  it('names a definition that cannot be read', async () => {
    const bytes = await buildCdrMcap(samples, { ...pose, schema: 'std_msgs/Header header\ngeometry_msgs/Pose pose' });
    expect(() => readMcapPoses(bytes, '/hopper/pose')).toThrow(/does not define/);
  });
});

describe('MCAP with compressed chunks', () => {
  it('reads lz4 chunks (compressed by lz4js, LZ4 frame format)', async () => {
    let chunks = 0;
    const bytes = await buildCdrMcap(samples, { ...pose, compressChunk: (data) => (chunks++, { compression: 'lz4', compressedData: lz4Compress(data) }) });
    expect(chunks).toBeGreaterThan(3);
    expectTrack(bytes);
    expect(listMcapTopics(bytes).map((t) => t.schemaName)).toEqual(['', 'geometry_msgs/msg/PoseStamped']);
  });

  it('reads zstd chunks (raw-block zstd frames)', async () => {
    expectTrack(await buildCdrMcap(samples, { ...pose, compressChunk: (data) => ({ compression: 'zstd', compressedData: zstdRawFrame(data) }) }));
  });

  it('refuses a compression it cannot open, naming what can be read', async () => {
    const bytes = await buildCdrMcap(samples, { ...pose, compressChunk: (data) => ({ compression: 'bz2', compressedData: data }) });
    expect(() => readMcapPoses(bytes, '/hopper/pose')).toThrow(/uncompressed, zstd or lz4/);
  });

  const fixtures = path.join('test', 'fixtures', 'mcap-compressed');
  const truth = syntheticTrack(COMPRESSED_FIXTURE_TRACK);
  for (const name of ['zstd', 'lz4']) {
    it(`reads chunks compressed by the ${name} command-line tool (fixture pose-${name}.mcap, SOURCE.md)`, () => {
      const bytes = new Uint8Array(readFileSync(path.join(fixtures, `pose-${name}.mcap`)));
      const poses = readMcapPoses(bytes, '/hopper/pose');
      expect(poses.length).toBe(truth.t.length);
      expect(poses.z[100]).toBeCloseTo(truth.z[100]!, 9);
      const r = mcapTrackMetrics(bytes, '/hopper/pose');
      expect(r.hops).toHaveLength(2);
      expect(r.hops[0]!.apexHeight).toBeCloseTo(0.15, 2);
      expect(r.hops[1]!.apexHeight).toBeCloseTo(0.1, 2);
      expect(r.hops[0]!.hopLength).toBeGreaterThan(0);
    });
  }
});
