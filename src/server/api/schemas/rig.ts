/**
 * Input shapes of the rig page: the combined log entry a tablet queues offline, and the import of
 * past trials. The tablet builds the same shapes before it queues an entry.
 */
import { z } from 'zod';
import { readingsSchema } from './campaign';

const isoTime = z.iso.datetime({ offset: true, error: 'use an ISO 8601 date-time' });

/** One trial started and finished in one request (header Idempotency-Key). */
export const trialLogSchema = readingsSchema.extend({
  runId: z.string().min(1, 'choose a run'),
  rigId: z.string().min(1).optional(),
  robotId: z.string().min(1).optional(),
  operator: z.string().trim().max(80).optional().default(''),
  startedAt: isoTime.optional(),
  status: z.enum(['done', 'failed', 'skipped']).optional().default('done'),
  /** Store even though the run already has a logged trial (the operator saw both and chose to keep both). */
  repeat: z.boolean().optional().default(false),
});

/** Import of past trials: the CSV text, its column mapping and units, and the explicit partial choice. */
export const trialImportSchema = z.object({
  csv: z.string().min(1, 'choose a CSV file with a header row'),
  mapping: z.record(z.string(), z.string()),
  units: z.record(z.string(), z.string()).optional().default({}),
  /** Store only the valid rows; must be given explicitly when some rows are invalid. */
  acceptValidRowsOnly: z.boolean().optional().default(false),
  /** Only validate and answer the report; store nothing. */
  dryRun: z.boolean().optional().default(false),
  fileName: z.string().max(200).optional().default(''),
});
