/** Inputs of the week-plan endpoints: week grid span, day sheet, moving a whole plot. */
import { z } from 'zod';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'use a date as yyyy-MM-dd');

export const planMoveSchema = z
  .object({
    wholePlot: z.union([z.string().min(1), z.number().int()]).optional(),
    runId: z.string().min(1).optional(),
    rig: z.string().min(1, 'choose the rig to move to'),
    start: z.iso.datetime({ offset: true, error: 'use an ISO 8601 date-time' }).optional(),
    day: day.optional(),
    time: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'use 24-hour HH:mm, e.g. 09:00').optional(),
    runOrder: z.array(z.string().min(1)).max(500).optional(),
  })
  .superRefine((m, ctx) => {
    if (m.wholePlot === undefined && m.runId === undefined) ctx.addIssue({ code: 'custom', path: ['wholePlot'], message: 'name the whole plot (or the run) to move' });
    if (m.start === undefined && (m.day === undefined || m.time === undefined)) {
      ctx.addIssue({ code: 'custom', path: [m.day === undefined ? 'day' : 'time'], message: 'give the new start as day and time (or as an ISO start)' });
    }
  });

export const planSpanSchema = z.object({
  from: day.optional(),
  days: z.coerce.number().int().min(1).max(62).optional(),
});

export const daySheetQuerySchema = z.object({ rig: z.string().min(1, 'name the rig (rig=<rig id>)'), day });

export type PlanMoveInput = z.output<typeof planMoveSchema>;
