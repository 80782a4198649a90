/**
 * Pose samples from an MCAP log (the open robotics log format) for one topic, read with @mcap/core's
 * stream reader. Messages must be JSON-encoded; accepted shapes, in order of preference:
 *   { t, x, y, z }                                  t in seconds (optional)
 *   { position: { x, y, z } }                       a bare pose
 *   { pose: { position: { x, y, z }, orientation } } a pose or a stamped pose
 *   { pose: { pose: { position: ... } } }           a pose with covariance
 * The sample time is `t`, else `header.stamp` ({sec, nanosec} or {sec, nsec}), else the log time.
 * Times are returned relative to the first sample; `timeOrigin` holds that first time in seconds.
 */
import { McapStreamReader } from '@mcap/core';
import { DomainError, invalidInput } from '@/domain/errors';
import { hopMetrics, type HopOptions, type TrackMetrics, type TrackSamples } from './hops';

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
  const candidates = [m, asObject(m.position), asObject(asObject(m.pose)?.position), asObject(asObject(asObject(m.pose)?.pose)?.position)];
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

/** Read the positions published on `topic`; see the module comment. */
export function readMcapPoses(bytes: Uint8Array, topic: string): McapPoses {
  const reader = new McapStreamReader({ validateCrcs: true });
  const channels = new Map<number, { topic: string; encoding: string }>();
  const times: number[] = [];
  const xs: number[] = [];
  const ys: number[] = [];
  const zs: number[] = [];
  let skipped = 0;
  const decoder = new TextDecoder();
  try {
    reader.append(bytes);
    for (let record = reader.nextRecord(); record; record = reader.nextRecord()) {
      if (record.type === 'Channel') {
        channels.set(record.id, { topic: record.topic, encoding: record.messageEncoding });
      } else if (record.type === 'Message') {
        const channel = channels.get(record.channelId);
        if (!channel || channel.topic !== topic) continue;
        if (channel.encoding !== 'json') {
          throw new DomainError('unsupported', `topic '${topic}' is encoded as '${channel.encoding}'; only JSON-encoded messages are read`, 'topic');
        }
        let message: Json | undefined;
        try {
          message = asObject(JSON.parse(decoder.decode(record.data)));
        } catch {
          message = undefined;
        }
        const position = message && positionOf(message);
        if (!message || !position) {
          skipped++;
          continue;
        }
        times.push(stampOf(message) ?? Number(record.logTime) * 1e-9);
        xs.push(position[0]);
        ys.push(position[1]);
        zs.push(position[2]);
      }
    }
  } catch (e) {
    if (e instanceof DomainError) throw e;
    throw invalidInput('(body)', `the file is not a readable MCAP log (${e instanceof Error ? e.message : String(e)}); compressed chunks are not supported, write the log without chunk compression`);
  }
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
