import { describe, expect, it } from 'vitest';
import { decodeCdr, parseRos2Schema } from '@/domain/tracks/cdr';
import { BODY_STATE_SCHEMA, CdrWriter, POSE_STAMPED_SCHEMA, TRANSFORM_STAMPED_SCHEMA, encodeBodyState, encodePoseStamped, encodeTransformStamped } from './mcap-build';

describe('ROS 2 message definitions', () => {
  it('resolves nested types by package, Header and builtin time, and skips constants', () => {
    const s = parseRos2Schema('geometry_msgs/msg/PoseStamped', POSE_STAMPED_SCHEMA);
    expect(s.root).toBe('geometry_msgs/PoseStamped');
    expect(s.definitions.get('geometry_msgs/Pose')!.map((f) => f.type)).toEqual(['geometry_msgs/Point', 'geometry_msgs/Quaternion']);
    const body = parseRos2Schema('hopper_msgs/msg/BodyState', BODY_STATE_SCHEMA);
    expect(body.definitions.get('hopper_msgs/BodyState')!.map((f) => `${f.name}:${f.kind}`)).toEqual([
      'mode:single', 't:single', 'motor_ticks:sequence', 'label:single', 'x:single', 'y:single', 'z:single', 'frame:single', 'battery:array',
    ]);
    // builtin_interfaces/Time is known even when the schema leaves it out.
    const bare = parseRos2Schema('a/msg/B', 'builtin_interfaces/Time stamp\nfloat64[<=4] v\nstring<=10 s');
    expect(bare.definitions.get('a/B')!.map((f) => f.kind)).toEqual(['single', 'sequence', 'single']);
  });

  it('names an undefined nested type and an unreadable line', () => {
    expect(() => parseRos2Schema('a/msg/B', 'geometry_msgs/Point p')).toThrow(/'geometry_msgs\/Point', which the schema does not define/);
    expect(() => parseRos2Schema('a/msg/B', 'float64')).toThrow(/is not 'type name'/);
  });
});

describe('CDR decoding', () => {
  it('decodes a hand-laid little-endian message: alignment counted after the 4-byte header (OMG CDR, common practice, no source)', () => {
    const schema = parseRos2Schema('t/msg/M', 'uint8 a\nfloat64 b\nint16 c\nstring d\nuint32[] e');
    // header 00 01 00 00 | a=7 | 7 pad | b=1.5 | c=-2 | 2 pad | len=3 'h' 'i' NUL | 1 pad | count 1 | 9
    const bytes = Uint8Array.from([
      0x00, 0x01, 0x00, 0x00,
      0x07, 0, 0, 0, 0, 0, 0, 0,
      0, 0, 0, 0, 0, 0, 0xf8, 0x3f,
      0xfe, 0xff, 0, 0,
      3, 0, 0, 0, 0x68, 0x69, 0x00, 0,
      1, 0, 0, 0, 9, 0, 0, 0,
    ]);
    expect(decodeCdr(schema, bytes)).toEqual({ a: 7, b: 1.5, c: -2, d: 'hi', e: [9] });
  });

  it('decodes the same message big-endian', () => {
    const schema = parseRos2Schema('t/msg/M', 'uint8 a\nfloat64 b\nint16 c');
    const bytes = Uint8Array.from([0x00, 0x00, 0, 0, 0x07, 0, 0, 0, 0, 0, 0, 0, 0x3f, 0xf8, 0, 0, 0, 0, 0, 0, 0xff, 0xfe]);
    expect(decodeCdr(schema, bytes)).toEqual({ a: 7, b: 1.5, c: -2 });
  });

  it('round-trips PoseStamped, TransformStamped and a custom message in both byte orders', () => {
    const sample = { t: 1_750_000_000.25, x: 0.125, y: -0.5, z: 0.2 };
    for (const little of [true, false]) {
      const pose = decodeCdr(parseRos2Schema('geometry_msgs/msg/PoseStamped', POSE_STAMPED_SCHEMA), encodePoseStamped(sample, little));
      expect(pose).toEqual({
        header: { stamp: { sec: 1_750_000_000, nanosec: 250_000_000 }, frame_id: 'world' },
        pose: { position: { x: 0.125, y: -0.5, z: 0.2 }, orientation: { x: 0, y: 0, z: 0, w: 1 } },
      });
      const tf = decodeCdr(parseRos2Schema('geometry_msgs/msg/TransformStamped', TRANSFORM_STAMPED_SCHEMA), encodeTransformStamped(sample, little));
      expect(tf.child_frame_id).toBe('hopper_base');
      expect(tf.transform).toEqual({ translation: { x: 0.125, y: -0.5, z: 0.2 }, rotation: { x: 0, y: 0, z: 0, w: 1 } });
      const body = decodeCdr(parseRos2Schema('hopper_msgs/msg/BodyState', BODY_STATE_SCHEMA), encodeBodyState(sample, 5, little));
      expect(body).toMatchObject({ mode: 1, t: sample.t, motor_ticks: [-1, -2], label: 'hop', x: 0.125, y: -0.5, frame: 5 });
      expect(body.z as number).toBeCloseTo(0.2, 6);
      expect((body.battery as number[]).map((v) => Number(v.toFixed(3)))).toEqual([3.7, 3.6, 3.5]);
    }
  });

  it('refuses cut-short messages and other encapsulations', () => {
    const schema = parseRos2Schema('geometry_msgs/msg/PoseStamped', POSE_STAMPED_SCHEMA);
    const bytes = encodePoseStamped({ t: 1, x: 0, y: 0, z: 0 });
    expect(() => decodeCdr(schema, bytes.subarray(0, bytes.length - 3))).toThrow(/more needed/);
    const pl = bytes.slice();
    pl[1] = 0x03;
    expect(() => decodeCdr(schema, pl)).toThrow(/not plain CDR/);
    expect(() => decodeCdr(schema, new CdrWriter().done().subarray(0, 2))).toThrow(/4-byte/);
  });
});
