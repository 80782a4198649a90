/** POST /api/v1/suggestions: the request schema and the handler (stateless). */
import { z } from 'zod';
import { suggestTrials, type SuggestionRequest, type SuggestionResult } from '@/domain/surrogate';
import { suggestionsOffThread } from '@/server/jobs/off-thread';
import { parseWith } from './validation';

const name = z.string().regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, 'a name starts with a letter and has only letters, digits and _ (at most 40)');
const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be a finite number');
const common = { name, unit: z.string().max(40).optional(), hardToChange: z.boolean().optional() };

const suggestionFactorSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ ...common, kind: z.literal('continuous'), low: finite, high: finite }),
    z.object({ ...common, kind: z.literal('discrete'), values: z.array(finite).min(2).max(50) }),
    z.object({ ...common, kind: z.literal('categorical'), levels: z.array(z.string().min(1).max(60)).min(2).max(50) }),
  ],
  { error: 'kind must be "continuous", "discrete" or "categorical"' },
);

const cell = z.union([z.number(), z.string().max(200), z.boolean(), z.null()]);

export const suggestionRequestSchema = z.object({
  factors: z.array(suggestionFactorSchema).min(1, 'give at least one factor').max(30),
  data: z.array(z.record(z.string(), cell)).max(5000, 'at most 5000 trials per request'),
  response: name,
  goal: z.enum(['maximize', 'minimize'], { error: 'goal must be "maximize" or "minimize"' }),
  count: z.number().int('count must be a whole number').min(1).max(100),
  strategy: z.enum(['improve', 'explore', 'refine', 'confirm'], { error: 'strategy must be "improve", "explore", "refine" or "confirm"' }).optional(),
  swapCost: z.record(z.string(), finite.refine((v) => v >= 0, 'a change cost is minutes, zero or more')).optional(),
  feasibilityThreshold: z.number().min(0).max(1).optional(),
  batch: z.enum(['believer', 'penalised'], { error: 'batch must be "believer" (kriging believer) or "penalised" (local penalisation)' }).optional(),
  seed: z.number().int().min(0).max(2 ** 31 - 1).optional(),
  trialMinutes: z.number().positive().max(24 * 60).optional(),
  constraints: z
    .array(z.object({ terms: z.record(z.string(), finite), min: finite.optional(), max: finite.optional() }))
    .max(50)
    .optional(),
  disallowed: z.array(z.object({ levels: z.record(z.string(), z.union([z.number(), z.string()])) })).max(200).optional(),
  kernel: z.enum(['matern52', 'squared-exponential']).optional(),
  responses: z
    .array(
      z.object({
        name,
        unit: z.string().max(40).optional(),
        goal: z.enum(['maximize', 'minimize', 'target'], { error: 'goal must be "maximize", "minimize" or "target"' }),
        target: finite.optional(),
        lower: finite.optional(),
        upper: finite.optional(),
        shape: z.number().positive().optional(),
        shapeLow: z.number().positive().optional(),
        shapeHigh: z.number().positive().optional(),
        importance: z.number().positive().optional(),
      }),
    )
    .max(20)
    .optional(),
});

export type SuggestionRequestInput = z.infer<typeof suggestionRequestSchema>;

/** Validate the body and suggest the next trials. */
export function handleSuggestionRequest(body: unknown): SuggestionResult {
  const request = parseWith(suggestionRequestSchema, body) as SuggestionRequest;
  return suggestTrials(request);
}

/** The route's handler: the surrogate fit and the batch run in the worker pool (awaited), off the event loop. */
export async function handleSuggestionRequestOffThread(body: unknown): Promise<SuggestionResult> {
  const request = parseWith(suggestionRequestSchema, body) as SuggestionRequest;
  return suggestionsOffThread(request);
}
