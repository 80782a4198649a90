import { describe, expect, it } from 'vitest';
import { McapWriter } from '@mcap/core';
import { MemoryWritable } from './mcap-build';
import { mcapTrackMetrics, readMcapPoses } from '@/domain/tracks/mcap';
import { syntheticTrack } from './synthetic';

type Shape = 'flat' | 'stamped';

async function buildMcap(track: ReturnType<typeof syntheticTrack>, shape: Shape, encoding = 'json'): Promise<Uint8Array> {
  const sink = new MemoryWritable();
  const writer = new McapWriter({ writable: sink, chunkSize: 4096 });
  await writer.start({ profile: '', library: 'saltus test' });
  const schemaId = await writer.registerSchema({ name: 'pose', encoding: 'jsonschema', data: new TextEncoder().encode('{"type":"object"}') });
  const poseChannel = await writer.registerChannel({ topic: '/rig/pose', schemaId, messageEncoding: encoding, metadata: new Map() });
  const otherChannel = await writer.registerChannel({ topic: '/rig/battery', schemaId, messageEncoding: 'json', metadata: new Map() });
  const base = 1_750_000_000; // an invented epoch second
  for (let i = 0; i < track.t.length; i++) {
    const t = base + track.t[i]!;
    const sec = Math.floor(t);
    const nanosec = Math.round((t - sec) * 1e9);
    const message = shape === 'flat'
      ? { t: track.t[i], x: track.x[i], y: track.y[i], z: track.z[i] }
      : { header: { stamp: { sec, nanosec }, frame_id: 'world' }, pose: { position: { x: track.x[i], y: track.y[i], z: track.z[i] }, orientation: { x: 0, y: 0, z: 0, w: 1 } } };
    const logTime = BigInt(sec) * 1_000_000_000n + BigInt(nanosec);
    await writer.addMessage({ channelId: poseChannel, sequence: i, logTime, publishTime: logTime, data: new TextEncoder().encode(JSON.stringify(message)) });
    if (i % 100 === 0) {
      await writer.addMessage({ channelId: otherChannel, sequence: i, logTime, publishTime: logTime, data: new TextEncoder().encode('{"volts":3.7}') });
    }
  }
  await writer.end();
  return sink.bytes();
}

const track = syntheticTrack({
  hops: [
    { apexHeight: 0.12, vx: 0.25, vy: 0, stanceBefore: 0.2 },
    { apexHeight: 0.08, vx: 0.2, vy: 0.05, stanceBefore: 0.12 },
  ],
  sampleRate: 250,
  noise: 0.0002,
});

describe('MCAP pose reading (files built with @mcap/core writer)', () => {
  it('reads {t, x, y, z} messages of one topic and finds the hops', async () => {
    const bytes = await buildMcap(track, 'flat');
    const poses = readMcapPoses(bytes, '/rig/pose');
    expect(poses.length).toBe(track.t.length);
    expect(poses.topics).toEqual(['/rig/battery', '/rig/pose']);
    expect(poses.z[10]).toBe(track.z[10]);
    const r = mcapTrackMetrics(bytes, '/rig/pose');
    expect(r.hops).toHaveLength(2);
    expect(r.hops[0]!.apexHeight).toBeCloseTo(0.12, 2);
  });

  it('reads stamped poses, taking time from the header stamp', async () => {
    const bytes = await buildMcap(track, 'stamped');
    const poses = readMcapPoses(bytes, '/rig/pose');
    expect(poses.timeOrigin).toBeCloseTo(1_750_000_000, 3);
    expect(poses.t[100]).toBeCloseTo(track.t[100]! - track.t[0]!, 6);
    const r = mcapTrackMetrics(bytes, '/rig/pose', { massKg: 0.001, energyJ: 0.1 });
    expect(r.hops).toHaveLength(2);
    expect(r.hops[1]!.apexHeight).toBeCloseTo(0.08, 2);
    expect(r.summary.costOfTransport).toBeGreaterThan(0);
  });

  it('names the topics when the chosen one is absent, and refuses CDR without a ROS 2 definition or other encodings', async () => {
    const bytes = await buildMcap(track, 'flat');
    expect(() => readMcapPoses(bytes, '/rig/imu')).toThrow(/'\/rig\/battery', '\/rig\/pose'/);
    const cdr = await buildMcap(track, 'flat', 'cdr');
    expect(() => readMcapPoses(cdr, '/rig/pose')).toThrow(/only ROS 2 message definitions \(ros2msg\)/);
    const proto = await buildMcap(track, 'flat', 'protobuf');
    expect(() => readMcapPoses(proto, '/rig/pose')).toThrow(/JSON and CDR \(ROS 2\) messages are read/);
    expect(() => readMcapPoses(new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9]), '/rig/pose')).toThrow(/not a readable MCAP/);
  });
});
