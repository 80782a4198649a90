/** POST /api/v1/schedules: the request schema and the handler (stateless: runs and rigs in, schedule out). */
import { z } from 'zod';
import { DomainError, invalidInput } from '@/domain/errors';
import { planSchedule, replan, workingAvailability, type RigCalendar, type ScheduleEvent, type ScheduleRequest, type ScheduleResult } from '@/domain/schedule';
import { parseWith } from './validation';

const instant = z.iso.datetime({ offset: true, message: 'write an ISO 8601 instant with a zone, e.g. 2026-03-02T08:00:00Z' });
const minutes = z.number().finite().min(0).max(7 * 24 * 60);
const label = z.union([z.string().min(1).max(80), z.number().int()]);

export const scheduleRunSchema = z.object({
  id: z.string().min(1).max(80),
  values: z.record(z.string(), z.union([z.number(), z.string(), z.boolean()])),
  durationMinutes: z.number().finite().positive().max(7 * 24 * 60).optional(),
  wholePlot: label.optional(),
  block: label.optional(),
});

export const rigCalendarSchema = z.object({
  workdays: z.array(z.number().int().min(1).max(7)).max(7),
  startTime: z.string().regex(/^\d{2}:\d{2}$/, 'write a clock time as HH:mm'),
  endTime: z.string().regex(/^\d{2}:\d{2}$/, 'write a clock time as HH:mm'),
  timeZone: z.string().min(1).max(60),
  daysOff: z.array(z.iso.date({ message: 'write a calendar day as yyyy-MM-dd' })).max(1000).optional(),
  blocked: z.array(z.object({ start: instant, end: instant })).max(5000).optional(),
});

/** A rig gives its available intervals, or a calendar that `horizon` turns into them. */
export const scheduleRigSchema = z
  .object({
    name: z.string().min(1).max(80),
    available: z.array(z.object({ start: instant, end: instant })).max(5000).optional(),
    calendar: rigCalendarSchema.optional(),
  })
  .refine((r) => r.available !== undefined || r.calendar !== undefined, { message: 'give the rig `available` intervals or a `calendar`' });

export const scheduleRequestSchema = z.object({
  runs: z.array(scheduleRunSchema).max(5000),
  rigs: z.array(scheduleRigSchema).min(1, 'name at least one rig').max(100),
  /** The days a rig calendar covers: from a local calendar day, for a number of days. */
  horizon: z.object({ from: z.iso.date({ message: 'write a calendar day as yyyy-MM-dd' }), days: z.number().int().min(1).max(366) }).optional(),
  changeoverMinutes: z.record(z.string(), minutes).optional(),
  operators: z
    .array(z.object({ name: z.string().min(1).max(80), rig: z.string().min(1).max(80), available: z.array(z.object({ start: instant, end: instant })).max(5000) }))
    .max(200)
    .optional(),
  upkeep: z
    .object({
      everyTrials: z.number().int().min(1).max(10_000).optional(),
      everyMinutes: z.number().finite().positive().max(7 * 24 * 60).optional(),
      minutes,
      cooldownMinutes: minutes.optional(),
    })
    .optional(),
  defaultDurationMinutes: z.number().finite().positive().max(7 * 24 * 60).optional(),
  timeZone: z.string().min(1).max(60).optional(),
  blockDays: z.record(z.string(), z.iso.date({ message: 'write a calendar day as yyyy-MM-dd' })).optional(),
  strategy: z.enum(['sequential', 'grouped']).optional(),
  seed: z.number().int().optional(),
  /** Re-planning: trials already done (kept as they happened), what went wrong, and the present instant. */
  fixed: z.array(z.object({ runId: z.string().min(1).max(80), rig: z.string().min(1).max(80), start: instant, end: instant })).max(5000).optional(),
  events: z
    .array(
      z.discriminatedUnion('kind', [
        z.object({ kind: z.literal('trial_failed'), runId: z.string().min(1).max(80), repeat: z.boolean().optional() }),
        z.object({ kind: z.literal('trial_skipped'), runId: z.string().min(1).max(80) }),
        z.object({ kind: z.literal('rig_down'), rig: z.string().min(1).max(80), start: instant, end: instant.optional() }),
      ]),
    )
    .max(5000)
    .optional(),
  now: instant.optional(),
});

export type ScheduleRequestInput = z.infer<typeof scheduleRequestSchema>;

/** Plan, or re-plan when `fixed`, `events` or `now` is given. */
export function handleScheduleRequest(body: unknown): ScheduleResult {
  const { fixed, events, now, horizon, rigs, ...rest } = parseWith(scheduleRequestSchema, body);
  const request: ScheduleRequest = {
    ...rest,
    rigs: rigs.map((rig, i) => {
      const fromCalendar = rig.calendar ? calendarIntervals(rig.calendar, horizon, i) : [];
      return { name: rig.name, available: [...(rig.available ?? []), ...fromCalendar] };
    }),
  };
  if (fixed !== undefined || events !== undefined || now !== undefined) {
    return replan(request, fixed ?? [], (events ?? []) as ScheduleEvent[], now);
  }
  return planSchedule(request);
}

function calendarIntervals(calendar: RigCalendar, horizon: { from: string; days: number } | undefined, index: number) {
  if (!horizon) throw invalidInput('horizon', `rigs[${index}] has a calendar; give horizon { from: yyyy-MM-dd, days } to say which days it covers`);
  try {
    return workingAvailability(calendar, horizon.from, horizon.days);
  } catch (e) {
    if (e instanceof DomainError && e.field) throw invalidInput(`rigs[${index}].${e.field}`, e.message);
    throw e;
  }
}
