/**
 * Test helpers: MCAP logs built with @mcap/core's writer, with pose messages CDR-encoded here (an
 * encoder written for the tests, independent of the decoder under test). The messages are ROS 2
 * definitions written out as an MCAP `ros2msg` schema carries them.
 */
import { McapWriter, type IWritable } from '@mcap/core';

/** An in-memory sink for @mcap/core's writer. */
export class MemoryWritable implements IWritable {
  private parts: Uint8Array[] = [];
  private size = 0n;
  async write(buffer: Uint8Array): Promise<void> {
    this.parts.push(buffer.slice());
    this.size += BigInt(buffer.byteLength);
  }
  position(): bigint {
    return this.size;
  }
  bytes(): Uint8Array {
    const out = new Uint8Array(Number(this.size));
    let at = 0;
    for (const p of this.parts) {
      out.set(p, at);
      at += p.byteLength;
    }
    return out;
  }
}

/**
 * Plain CDR writer: 4-byte encapsulation header (0x0001 little-endian, 0x0000 big-endian), each
 * primitive aligned to its size counted from the end of the header, strings as a uint32 length that
 * counts the terminating NUL (OMG CDR, common practice, no source).
 */
export class CdrWriter {
  private bytes: number[];
  constructor(private readonly little = true) {
    this.bytes = [0x00, little ? 0x01 : 0x00, 0x00, 0x00];
  }
  private align(n: number) {
    while ((this.bytes.length - 4) % n !== 0) this.bytes.push(0);
  }
  private put(n: number, write: (v: DataView) => void) {
    this.align(n);
    const b = new Uint8Array(n);
    write(new DataView(b.buffer));
    this.bytes.push(...b);
  }
  uint8(v: number) { this.put(1, (d) => d.setUint8(0, v)); return this; }
  int16(v: number) { this.put(2, (d) => d.setInt16(0, v, this.little)); return this; }
  int32(v: number) { this.put(4, (d) => d.setInt32(0, v, this.little)); return this; }
  uint32(v: number) { this.put(4, (d) => d.setUint32(0, v, this.little)); return this; }
  float32(v: number) { this.put(4, (d) => d.setFloat32(0, v, this.little)); return this; }
  float64(v: number) { this.put(8, (d) => d.setFloat64(0, v, this.little)); return this; }
  uint64(v: bigint) { this.put(8, (d) => d.setBigUint64(0, v, this.little)); return this; }
  string(s: string) {
    const b = new TextEncoder().encode(s);
    this.uint32(b.length + 1);
    this.bytes.push(...b, 0);
    return this;
  }
  done(): Uint8Array {
    return Uint8Array.from(this.bytes);
  }
}

const SEP = '='.repeat(80);

export const POSE_STAMPED_SCHEMA = [
  'std_msgs/Header header',
  'geometry_msgs/Pose pose',
  SEP,
  'MSG: std_msgs/Header',
  '# Standard metadata for higher-level stamped data types.',
  'builtin_interfaces/Time stamp',
  'string frame_id',
  SEP,
  'MSG: builtin_interfaces/Time',
  'int32 sec',
  'uint32 nanosec',
  SEP,
  'MSG: geometry_msgs/Pose',
  'Point position',
  'Quaternion orientation',
  SEP,
  'MSG: geometry_msgs/Point',
  'float64 x',
  'float64 y',
  'float64 z',
  SEP,
  'MSG: geometry_msgs/Quaternion',
  'float64 x 0',
  'float64 y 0',
  'float64 z 0',
  'float64 w 1',
].join('\n');

export const TRANSFORM_STAMPED_SCHEMA = [
  'std_msgs/Header header',
  'string child_frame_id # the frame id of the child frame',
  'Transform transform',
  SEP,
  'MSG: std_msgs/Header',
  'builtin_interfaces/Time stamp',
  'string frame_id',
  SEP,
  'MSG: geometry_msgs/Transform',
  'Vector3 translation',
  'Quaternion rotation',
  SEP,
  'MSG: geometry_msgs/Vector3',
  'float64 x',
  'float64 y',
  'float64 z',
  SEP,
  'MSG: geometry_msgs/Quaternion',
  'float64 x 0',
  'float64 y 0',
  'float64 z 0',
  'float64 w 1',
].join('\n');

/** An invented message of a test package: odd field order on purpose (alignment gaps, a sequence). */
export const BODY_STATE_SCHEMA = [
  'uint8 MODE_IDLE=0',
  'uint8 MODE_HOP=1',
  'uint8 mode',
  'float64 t',
  'int16[] motor_ticks',
  'string label',
  'float32 x',
  'float32 y',
  'float32 z',
  'uint64 frame',
  'float32[3] battery',
].join('\n');

export interface Sample {
  t: number;
  x: number;
  y: number;
  z: number;
}

function stampOf(t: number): [number, number] {
  const sec = Math.floor(t);
  return [sec, Math.round((t - sec) * 1e9)];
}

export function encodePoseStamped(s: Sample, little = true): Uint8Array {
  const [sec, nanosec] = stampOf(s.t);
  return new CdrWriter(little).int32(sec).uint32(nanosec).string('world').float64(s.x).float64(s.y).float64(s.z).float64(0).float64(0).float64(0).float64(1).done();
}

export function encodeTransformStamped(s: Sample, little = true): Uint8Array {
  const [sec, nanosec] = stampOf(s.t);
  return new CdrWriter(little).int32(sec).uint32(nanosec).string('world').string('hopper_base').float64(s.x).float64(s.y).float64(s.z).float64(0).float64(0).float64(0).float64(1).done();
}

export function encodeBodyState(s: Sample, i: number, little = true): Uint8Array {
  const w = new CdrWriter(little).uint8(1).float64(s.t).uint32(i % 3);
  for (let k = 0; k < i % 3; k++) w.int16(-k - 1);
  return w.string(i % 2 ? 'hop' : '').float32(s.x).float32(s.y).float32(s.z).uint64(BigInt(i)).float32(3.7).float32(3.6).float32(3.5).done();
}

export interface CdrLogOptions {
  schemaName: string;
  schema: string;
  encode: (s: Sample, i: number) => Uint8Array;
  compressChunk?: (data: Uint8Array) => { compression: string; compressedData: Uint8Array };
  chunkSize?: number;
}

/** Epoch second of the invented recordings. */
export const BASE_TIME = 1_750_000_000;

/** An MCAP log with the samples on /hopper/pose (CDR) and a JSON battery topic beside it. */
export async function buildCdrMcap(samples: Sample[], options: CdrLogOptions): Promise<Uint8Array> {
  const sink = new MemoryWritable();
  const writer = new McapWriter({ writable: sink, chunkSize: options.chunkSize ?? 2048, compressChunk: options.compressChunk });
  await writer.start({ profile: 'ros2', library: 'saltus test' });
  const poseSchema = await writer.registerSchema({ name: options.schemaName, encoding: 'ros2msg', data: new TextEncoder().encode(options.schema) });
  const pose = await writer.registerChannel({ topic: '/hopper/pose', schemaId: poseSchema, messageEncoding: 'cdr', metadata: new Map() });
  const battery = await writer.registerChannel({ topic: '/hopper/battery', schemaId: 0, messageEncoding: 'json', metadata: new Map() });
  for (let i = 0; i < samples.length; i++) {
    const s = { ...samples[i]!, t: BASE_TIME + samples[i]!.t };
    const [sec, nanosec] = stampOf(s.t);
    const logTime = BigInt(sec) * 1_000_000_000n + BigInt(nanosec);
    await writer.addMessage({ channelId: pose, sequence: i, logTime, publishTime: logTime, data: options.encode(s, i) });
    if (i % 50 === 0) await writer.addMessage({ channelId: battery, sequence: i, logTime, publishTime: logTime, data: new TextEncoder().encode('{"volts":3.7}') });
  }
  await writer.end();
  return sink.bytes();
}

/**
 * A zstd frame (RFC 8878) holding the data in raw blocks: valid zstd that any decoder must read,
 * made here because the zstd decoder in use has no compressor.
 */
export function zstdRawFrame(data: Uint8Array): Uint8Array {
  const out: number[] = [0x28, 0xb5, 0x2f, 0xfd];
  // Frame header descriptor: Frame_Content_Size_flag 3 (8 bytes), Single_Segment 1, no checksum, no dictionary.
  out.push(0b1110_0000);
  const size = new DataView(new ArrayBuffer(8));
  size.setBigUint64(0, BigInt(data.length), true);
  out.push(...new Uint8Array(size.buffer));
  const MAX = 128 * 1024 - 1;
  let at = 0;
  do {
    const n = Math.min(MAX, data.length - at);
    const last = at + n >= data.length ? 1 : 0;
    const header = (n << 3) | (0 << 1) | last; // Block_Type 0 = Raw
    out.push(header & 0xff, (header >> 8) & 0xff, (header >> 16) & 0xff);
    for (let k = 0; k < n; k++) out.push(data[at + k]!);
    at += n;
  } while (at < data.length);
  return Uint8Array.from(out);
}

/** A synthetic track as samples. */
export function samplesOf(track: { t: ArrayLike<number>; x: ArrayLike<number>; y: ArrayLike<number>; z: ArrayLike<number> }): Sample[] {
  return Array.from({ length: track.t.length }, (_, i) => ({ t: track.t[i]!, x: track.x[i]!, y: track.y[i]!, z: track.z[i]! }));
}

/** The track in test/fixtures/mcap-compressed (written by its make.ts). */
export const COMPRESSED_FIXTURE_TRACK = {
  hops: [
    { apexHeight: 0.15, vx: 0.3, vy: 0, stanceBefore: 0.2 },
    { apexHeight: 0.1, vx: 0.25, vy: 0, stanceBefore: 0.15 },
  ],
  sampleRate: 200,
  noise: 0,
  seed: 11,
};
