/**
 * Pose samples from an MCAP log (the open robotics log format) for one topic, read with @mcap/core's
 * stream reader. Chunks may be uncompressed or compressed with zstd (fzstd) or lz4 (lz4js, frame
 * format). Messages are JSON-encoded, or CDR-encoded with a ROS 2 message definition (`ros2msg`
 * schema, decoded by ./cdr.ts). Accepted shapes, in order of preference:
 *   { t, x, y, z }                                  t in seconds (optional); any message with x, y, z
 *   { position: { x, y, z } }                       a bare pose
 *   { pose: { position: { x, y, z }, orientation } } a pose or a stamped pose
 *   { pose: { pose: { position: ... } } }           a pose with covariance, odometry
 *   { transform: { translation: { x, y, z } } }     a stamped transform
 * The sample time is `t`, else `header.stamp` ({sec, nanosec} or {sec, nsec}), else the log time.
 * Times are returned relative to the first sample; `timeOrigin` holds that first time in seconds.
 */
import { McapStreamReader, type DecompressHandlers } from '@mcap/core';
import { decompress as zstdDecompress } from 'fzstd';
import { decompress as lz4Decompress } from 'lz4js';
import { DomainError, invalidInput } from '@/domain/errors';
import { decodeCdr, parseRos2Schema, type CdrSchema } from './cdr';
import { hopMetrics, type HopOptions, type TrackMetrics, type TrackSamples } from './hops';

/** Chunk decompression by the compression name an MCAP chunk records. */
export const MCAP_DECOMPRESS: DecompressHandlers = {
  zstd: (buffer, size) => zstdDecompress(buffer, new Uint8Array(Number(size))),
  lz4: (buffer, size) => {
    const out = lz4Decompress(buffer, Number(size));
    return out instanceof Uint8Array ? out : Uint8Array.from(out);
  },
};

/** A topic of an MCAP log as the topic chooser lists it. */
export interface McapTopic {
  topic: string;
  /** Schema name, e.g. geometry_msgs/msg/PoseStamped ('' when the channel has no schema). */
  schemaName: string;
  schemaEncoding: string;
  messageEncoding: string;
  messages: number;
}

export interface McapPoses extends TrackSamples {
  length: number;
  /** Messages on the topic that carried no usable position. */
  skipped: number;
  /** Absolute time of the first sample, s. */
  timeOrigin: number;
  /** Topics present in the file, for a helpful error or a picker. */
  topics: string[];
}

type Json = Record<string, unknown>;

function asObject(v: unknown): Json | undefined {
  return typeof v === 'object' && v !== null && !Array.isArray(v) ? (v as Json) : undefined;
}

function num(v: unknown): number | undefined {
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

function positionOf(m: Json): [number, number, number] | undefined {
  const pose = asObject(m.pose);
  const candidates = [m, asObject(m.position), asObject(pose?.position), asObject(asObject(pose?.pose)?.position), asObject(asObject(m.transform)?.translation)];
  for (const c of candidates) {
    if (!c) continue;
    const x = num(c.x), y = num(c.y), z = num(c.z);
    if (x !== undefined && y !== undefined && z !== undefined) return [x, y, z];
  }
  return undefined;
}

function stampOf(m: Json): number | undefined {
  const t = num(m.t);
  if (t !== undefined) return t;
  const stamp = asObject(asObject(m.header)?.stamp);
  if (!stamp) return undefined;
  const sec = num(stamp.sec) ?? num(stamp.secs);
  const nsec = num(stamp.nanosec) ?? num(stamp.nsec) ?? num(stamp.nsecs) ?? 0;
  return sec === undefined ? undefined : sec + nsec * 1e-9;
}

interface ChannelInfo {
  topic: string;
  encoding: string;
  schemaId: number;
}

interface SchemaInfo {
  name: string;
  encoding: string;
  data: Uint8Array;
}

function notReadable(e: unknown): DomainError {
  if (e instanceof DomainError) return e;
  const detail = e instanceof Error ? e.message : String(e);
  return invalidInput('(body)', `the file is not a readable MCAP log (${detail}); chunks may be uncompressed, zstd or lz4, write the log with one of these`);
}

/** Walk every record of an MCAP file (compressed chunks opened). */
function eachRecord(bytes: Uint8Array, visit: (record: ReturnType<McapStreamReader['nextRecord']> & object) => void) {
  const reader = new McapStreamReader({ validateCrcs: true, decompressHandlers: MCAP_DECOMPRESS });
  try {
    reader.append(bytes);
    for (let record = reader.nextRecord(); record; record = reader.nextRecord()) visit(record);
    if (!reader.done()) throw new Error('the file ends before its footer; it may be cut short');
  } catch (e) {
    throw notReadable(e);
  }
}

/** The topics of an MCAP log with their schema names and message counts, sorted by topic. */
export function listMcapTopics(bytes: Uint8Array): McapTopic[] {
  const schemas = new Map<number, SchemaInfo>();
  const channels = new Map<number, ChannelInfo>();
  const counts = new Map<number, number>();
  eachRecord(bytes, (record) => {
    if (record.type === 'Schema') schemas.set(record.id, { name: record.name, encoding: record.encoding, data: record.data });
    else if (record.type === 'Channel') channels.set(record.id, { topic: record.topic, encoding: record.messageEncoding, schemaId: record.schemaId });
    else if (record.type === 'Message') counts.set(record.channelId, (counts.get(record.channelId) ?? 0) + 1);
  });
  const byTopic = new Map<string, McapTopic>();
  for (const [id, c] of channels) {
    const schema = schemas.get(c.schemaId);
    const entry = byTopic.get(c.topic);
    const messages = counts.get(id) ?? 0;
    if (entry) entry.messages += messages;
    else byTopic.set(c.topic, { topic: c.topic, schemaName: schema?.name ?? '', schemaEncoding: schema?.encoding ?? '', messageEncoding: c.encoding, messages });
  }
  return [...byTopic.values()].sort((a, b) => (a.topic < b.topic ? -1 : a.topic > b.topic ? 1 : 0));
}

/** A decoder from message bytes to a plain object, for one channel. */
function decoderFor(topic: string, channel: ChannelInfo, schema: SchemaInfo | undefined): (data: Uint8Array) => Json | undefined {
  if (channel.encoding === 'json') {
    const text = new TextDecoder();
    return (data) => {
      try {
        return asObject(JSON.parse(text.decode(data)));
      } catch {
        return undefined;
      }
    };
  }
  if (channel.encoding === 'cdr') {
    if (!schema || schema.encoding !== 'ros2msg') {
      throw new DomainError('unsupported', `topic '${topic}' is CDR-encoded ${schema ? `with a '${schema.encoding}' schema` : 'without a schema'}; only ROS 2 message definitions (ros2msg) are read, record the topic with its message definition`, 'topic');
    }
    let parsed: CdrSchema;
    try {
      parsed = parseRos2Schema(schema.name, new TextDecoder().decode(schema.data));
    } catch (e) {
      if (e instanceof DomainError) throw e;
      throw invalidInput('topic', `the message definition of '${topic}' cannot be read (${e instanceof Error ? e.message : String(e)})`);
    }
    return (data) => {
      try {
        return decodeCdr(parsed, data) as Json;
      } catch {
        return undefined;
      }
    };
  }
  throw new DomainError('unsupported', `topic '${topic}' is encoded as '${channel.encoding}'; JSON and CDR (ROS 2) messages are read`, 'topic');
}

/** Read the positions published on `topic`; see the module comment. */
export function readMcapPoses(bytes: Uint8Array, topic: string): McapPoses {
  const schemas = new Map<number, SchemaInfo>();
  const channels = new Map<number, ChannelInfo>();
  const decoders = new Map<number, (data: Uint8Array) => Json | undefined>();
  const times: number[] = [];
  const xs: number[] = [];
  const ys: number[] = [];
  const zs: number[] = [];
  let skipped = 0;
  eachRecord(bytes, (record) => {
    if (record.type === 'Schema') {
      schemas.set(record.id, { name: record.name, encoding: record.encoding, data: record.data });
    } else if (record.type === 'Channel') {
      channels.set(record.id, { topic: record.topic, encoding: record.messageEncoding, schemaId: record.schemaId });
    } else if (record.type === 'Message') {
      const channel = channels.get(record.channelId);
      if (!channel || channel.topic !== topic) return;
      let decode = decoders.get(record.channelId);
      if (!decode) {
        decode = decoderFor(topic, channel, schemas.get(channel.schemaId));
        decoders.set(record.channelId, decode);
      }
      const message = decode(record.data);
      const position = message && positionOf(message);
      if (!message || !position) {
        skipped++;
        return;
      }
      times.push(stampOf(message) ?? Number(record.logTime) * 1e-9);
      xs.push(position[0]);
      ys.push(position[1]);
      zs.push(position[2]);
    }
  });
  const topics = [...new Set([...channels.values()].map((c) => c.topic))].sort();
  if (times.length === 0 && skipped === 0) {
    throw invalidInput('topic', `no messages on topic '${topic}'; the file has ${topics.length ? topics.map((t) => `'${t}'`).join(', ') : 'no topics'}`);
  }
  let origin = times.length ? times[0]! : 0;
  for (const v of times) if (v < origin) origin = v;
  return {
    t: Float64Array.from(times, (v) => v - origin),
    x: Float64Array.from(xs),
    y: Float64Array.from(ys),
    z: Float64Array.from(zs),
    length: times.length,
    skipped,
    timeOrigin: origin,
    topics,
  };
}

/** Per-hop metrics from the poses of one MCAP topic (positions in metres). */
export function mcapTrackMetrics(bytes: Uint8Array, topic: string, options: HopOptions = {}): TrackMetrics {
  const poses = readMcapPoses(bytes, topic);
  const result = hopMetrics(poses, options);
  if (poses.skipped > 0) result.warnings.unshift(`${poses.skipped} messages on '${topic}' carried no position and were skipped`);
  return result;
}
