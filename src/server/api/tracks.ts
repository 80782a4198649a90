/**
 * `POST /api/v1/tracks/metrics`: a motion-track CSV in the body, the column mapping and units in the
 * query string; answers per-hop metrics in SI units.
 */
import { z } from 'zod';
import { invalidInput } from '@/domain/errors';
import { trackMetrics, type TrackMetrics, type TrackOrientation } from '@/domain/tracks';
import { parseWith } from './validation';

/** Largest track body accepted, bytes (a minute at 1 kHz is about 2.5 MB). */
export const MAX_TRACK_BYTES = 64 * 1024 * 1024;

const columnName = z.string().trim().min(1, 'give the column name as it appears in the CSV header');

/** An optional number given as a query-string value; blank means absent. */
export const optionalQueryNumber = z
  .string()
  .trim()
  .optional()
  .transform((s, ctx) => {
    if (s === undefined || s === '') return undefined;
    const v = Number(s);
    if (!Number.isFinite(v)) {
      ctx.addIssue({ code: 'custom', message: `'${s}' is not a number` });
      return z.NEVER;
    }
    return v;
  });

export const trackQuerySchema = z.object({
  time: columnName,
  x: columnName,
  y: columnName,
  z: columnName,
  lengthUnit: z.enum(['m', 'cm', 'mm'], { message: "use 'm', 'cm' or 'mm'" }),
  timeUnit: z.enum(['s', 'ms'], { message: "use 's' or 'ms'" }),
  massGrams: optionalQueryNumber.refine((v) => v === undefined || v > 0, 'the mass must be > 0 g'),
  energyJoules: optionalQueryNumber.refine((v) => v === undefined || v >= 0, 'the energy must be ≥ 0 J'),
  targetX: optionalQueryNumber,
  targetY: optionalQueryNumber,
  flightThreshold: optionalQueryNumber.refine((v) => v === undefined || v > 0, 'the flight threshold must be > 0'),
  gravityTolerance: optionalQueryNumber.refine((v) => v === undefined || (v > 0 && v < 1), 'the gravity tolerance is a fraction in (0, 1)'),
  // Optional orientation columns: a quaternion (qw, qx, qy, qz) or roll and pitch with angleUnit.
  qw: columnName.optional(),
  qx: columnName.optional(),
  qy: columnName.optional(),
  qz: columnName.optional(),
  roll: columnName.optional(),
  pitch: columnName.optional(),
  angleUnit: z.enum(['deg', 'rad'], { message: "use 'deg' or 'rad'" }).optional(),
});

export type TrackQuery = z.output<typeof trackQuerySchema>;

/** Parse the query, run the track through the metrics; domain errors name the field at fault. */
export function handleTrackMetrics(csv: string, query: URLSearchParams): TrackMetrics {
  const raw: Record<string, string> = {};
  for (const [key, value] of query) raw[key] = value;
  const q = parseWith(trackQuerySchema, raw);
  if (csv.trim() === '') throw invalidInput('(body)', 'the request body is empty; send the track as CSV text with a header line');
  const { qw, qx, qy, qz, roll, pitch, angleUnit, ...rest } = q;
  let orientation: TrackOrientation | undefined;
  const quaternion = { qw, qx, qy, qz };
  const givenQuaternion = Object.entries(quaternion).filter(([, v]) => v !== undefined);
  if (givenQuaternion.length > 0) {
    const missing = Object.entries(quaternion).find(([, v]) => v === undefined);
    if (missing) throw invalidInput(missing[0], `${missing[0]}: a quaternion needs all of qw, qx, qy and qz; name the missing column`);
    orientation = { qw: qw!, qx: qx!, qy: qy!, qz: qz! };
  } else if (roll !== undefined || pitch !== undefined) {
    if (roll === undefined) throw invalidInput('roll', 'roll: give both roll and pitch columns');
    if (pitch === undefined) throw invalidInput('pitch', 'pitch: give both roll and pitch columns');
    if (angleUnit === undefined) throw invalidInput('angleUnit', "angleUnit: say whether roll and pitch are in 'deg' or 'rad'");
    orientation = { roll, pitch, angleUnit };
  }
  const options = Object.fromEntries(Object.entries(rest).filter(([, v]) => v !== undefined)) as typeof rest;
  return trackMetrics(csv, { ...options, orientation });
}
