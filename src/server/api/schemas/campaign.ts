/**
 * One schema per entity, shared by the JSON API and the browser forms (client components import
 * these to validate before sending; the route handlers parse with the same schema).
 */
import { z } from 'zod';

const name = z
  .string()
  .trim()
  .regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, 'start with a letter; use letters, digits and _ only (at most 40)');
const label = z.string().trim().min(1, 'must not be empty').max(120, 'at most 120 characters');
const unit = z.string().trim().max(20, 'at most 20 characters').optional().default('');
const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be a finite number');

export const factorSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({
      name,
      kind: z.literal('continuous'),
      unit,
      low: finite,
      high: finite,
      hardToChange: z.boolean().optional().default(false),
      changeMinutes: z.number().int().min(0).max(24 * 60).optional().default(0),
    }),
    z.object({
      name,
      kind: z.literal('discrete'),
      unit,
      values: z.array(finite).min(2, 'give at least two values').max(50),
      hardToChange: z.boolean().optional().default(false),
      changeMinutes: z.number().int().min(0).max(24 * 60).optional().default(0),
    }),
    z.object({
      name,
      kind: z.literal('categorical'),
      unit: z.string().optional().default(''),
      levels: z.array(label.max(40)).min(2, 'give at least two levels').max(30),
      hardToChange: z.boolean().optional().default(false),
      changeMinutes: z.number().int().min(0).max(24 * 60).optional().default(0),
    }),
  ],
  { error: 'kind must be "continuous", "discrete" or "categorical"' },
);

export const responseSchema = z.object({
  name,
  unit,
  goal: z.enum(['maximize', 'minimize', 'target'], { error: 'goal must be "maximize", "minimize" or "target"' }),
  target: finite.optional(),
  lower: finite.optional(),
  upper: finite.optional(),
});

export const robotSchema = z.object({
  name: label.max(60),
  serial: z.string().trim().max(60).optional().default(''),
  massGrams: z.number({ error: 'must be a number' }).positive('must be above 0 g').max(1000, 'at most 1000 g; Saltus is for small robots'),
  heightMm: z.number().positive().max(1000).optional(),
  notes: z.string().max(2000).optional().default(''),
});

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'use 24-hour HH:mm, e.g. 09:00');

export const rigSchema = z
  .object({
    name: label.max(60),
    timeZone: z
      .string()
      .optional()
      .default('UTC')
      .refine((tz) => {
        try {
          new Intl.DateTimeFormat('en', { timeZone: tz });
          return true;
        } catch {
          return false;
        }
      }, 'not a known IANA time zone, e.g. Europe/Berlin or UTC'),
    workdays: z.array(z.number().int().min(1).max(7)).min(1).optional().default([1, 2, 3, 4, 5]),
    startTime: hhmm.optional().default('09:00'),
    endTime: hhmm.optional().default('17:00'),
  })
  .refine((r) => r.startTime < r.endTime, { message: 'endTime must be after startTime', path: ['endTime'] });

export const campaignCreateSchema = z
  .object({
    name: label,
    objective: z.string().trim().max(2000).optional().default(''),
    trialMinutes: z.number().int().min(1, 'at least 1 minute').max(600).optional().default(20),
    factors: z.array(factorSchema).min(1, 'give at least one factor').max(20),
    responses: z.array(responseSchema).min(1, 'give at least one response').max(10),
    robots: z.array(robotSchema).max(50).optional().default([]),
    rigs: z.array(rigSchema).max(20).optional().default([]),
  })
  .superRefine((c, ctx) => {
    const seen = new Set<string>();
    c.factors.forEach((f, i) => {
      if (seen.has(f.name)) ctx.addIssue({ code: 'custom', path: ['factors', i, 'name'], message: `factor name "${f.name}" is used twice` });
      seen.add(f.name);
      if (f.kind === 'continuous' && !(f.low < f.high)) {
        ctx.addIssue({ code: 'custom', path: ['factors', i, 'high'], message: `high (${f.high}) must be greater than low (${f.low})` });
      }
      if (f.kind === 'discrete' && new Set(f.values).size !== f.values.length) {
        ctx.addIssue({ code: 'custom', path: ['factors', i, 'values'], message: 'values must be distinct' });
      }
      if (f.kind === 'categorical' && new Set(f.levels).size !== f.levels.length) {
        ctx.addIssue({ code: 'custom', path: ['factors', i, 'levels'], message: 'levels must be distinct' });
      }
    });
    c.responses.forEach((r, i) => {
      if (seen.has(r.name)) ctx.addIssue({ code: 'custom', path: ['responses', i, 'name'], message: `"${r.name}" is already a factor or response name` });
      seen.add(r.name);
      if (r.goal === 'target' && r.target === undefined) ctx.addIssue({ code: 'custom', path: ['responses', i, 'target'], message: 'a target goal needs a target value' });
    });
    const robots = new Set<string>();
    c.robots.forEach((r, i) => {
      if (robots.has(r.name)) ctx.addIssue({ code: 'custom', path: ['robots', i, 'name'], message: `robot "${r.name}" is listed twice` });
      robots.add(r.name);
    });
    const rigs = new Set<string>();
    c.rigs.forEach((r, i) => {
      if (rigs.has(r.name)) ctx.addIssue({ code: 'custom', path: ['rigs', i, 'name'], message: `rig "${r.name}" is listed twice` });
      rigs.add(r.name);
    });
  });

export type CampaignCreate = z.output<typeof campaignCreateSchema>;
export type CampaignCreateInput = z.input<typeof campaignCreateSchema>;
export type FactorInput = z.output<typeof factorSchema>;

export const campaignDesignSchema = z.object({
  method: z.enum(['full-factorial', 'central-composite', 'fractional-factorial', 'plackett-burman', 'definitive-screening', 'box-behnken', 'latin-hypercube', 'sobol', 'optimal'], {
    error: 'choose a design method from the list',
  }),
  model: z.enum(['main-effects', 'interactions', 'quadratic']).optional(),
  centerPoints: z.number().int().min(0).max(20).optional(),
  replicates: z.number().int().min(1).max(10).optional(),
  runs: z.number().int().min(2).max(2000).optional(),
  seed: z.number().int().min(0).max(2 ** 31 - 1).optional(),
  /** Optional settings the design engine accepts (planner page); absent keeps each method's default. */
  criterion: z.enum(['D', 'I'], { error: 'criterion must be "D" or "I"' }).optional(),
  alpha: z.union([z.enum(['rotatable', 'orthogonal', 'face-centred']), z.number().positive().max(10)], { error: 'alpha must be rotatable, orthogonal, face-centred or a positive number' }).optional(),
  resolution: z.number().int().min(3).max(8).optional(),
  wholePlots: z.number().int().min(2).max(500).optional(),
  blocks: z.number().int().min(1).max(50).optional(),
  /** Two-level full factorials and fractions: block generators as interaction words over the factor letters, e.g. ["ABC", "CDE"]. */
  blockGenerators: z
    .array(z.string().trim().min(1, 'a block generator is a word such as "ABC"').max(200, 'a block generator has at most 200 characters'), {
      error: 'blockGenerators is a list of words such as ["ABC", "CDE"]',
    })
    .max(5, 'at most 5 block generators (32 blocks)')
    .optional(),
  /** Optimal designs: blocks as fixed (default) or random effects; varianceRatio = σ²(block or whole plot) / σ². */
  blockEffects: z.enum(['fixed', 'random'], { error: 'blockEffects must be "fixed" or "random"' }).optional(),
  varianceRatio: z.number().min(0, 'varianceRatio must be at least 0').max(1000, 'varianceRatio must be at most 1000').optional(),
  /** Optimal designs: random starts of the search (more starts, longer search; run as a job from the planner). */
  starts: z.number().int('starts must be a whole number').min(1, 'at least 1 start').max(10_000, 'at most 10000 starts').optional(),
});

export const scheduleCreateSchema = z.object({
  startDate: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'use a date as yyyy-MM-dd'),
  days: z.number().int().min(1).max(60).optional().default(5),
});

export const readingsSchema = z.object({
  observations: z
    .record(z.string(), z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be a finite number'))
    .optional()
    .default({}),
  passed: z.boolean().optional(),
  failureReason: z.string().trim().max(200).optional().default(''),
  notes: z.string().max(4000).optional().default(''),
  finishedAt: z.iso.datetime({ offset: true, error: 'use an ISO 8601 date-time' }).optional(),
});

export const trialStartSchema = z.object({
  runId: z.string().min(1, 'choose a run'),
  rigId: z.string().min(1).optional(),
  robotId: z.string().min(1).optional(),
  operator: z.string().trim().max(80).optional().default(''),
  startedAt: z.iso.datetime({ offset: true, error: 'use an ISO 8601 date-time' }).optional(),
});

export const trialFinishSchema = readingsSchema.extend({
  status: z.enum(['done', 'failed', 'skipped']).optional().default('done'),
  version: z.number().int().min(1).optional(),
});

export const amendmentSchema = z.object({
  field: z.string().min(1, 'name the value you correct'),
  newValue: z.union([z.number(), z.string(), z.boolean()]),
  reason: z.string().trim().min(3, 'say why the value is corrected (at least 3 characters)').max(500),
});

export const campaignAnalysisSchema = z.object({
  response: name,
  model: z.enum(['main-effects', 'interactions', 'quadratic']).optional().default('main-effects'),
  terms: z.array(z.string().max(100)).max(200).optional(),
});

export const nextTrialSchema = z.object({
  model: z.enum(['main-effects', 'interactions', 'quadratic']).optional().default('quadratic'),
  seed: z.number().int().min(0).optional(),
});

export const runCreateSchema = z.object({
  values: z.record(z.string(), z.union([z.number(), z.string()])),
  source: z.enum(['design', 'suggestion', 'import']).optional().default('suggestion'),
  reason: z.string().max(500).optional(),
});

export const suggestionBatchSchema = z.object({
  strategy: z.enum(['improve', 'explore', 'refine', 'confirm'], { error: 'strategy must be improve, explore, refine or confirm' }).optional().default('improve'),
  response: name,
  count: z.number().int().min(1, 'ask for at least 1 trial').max(20, 'at most 20 trials in one batch').optional().default(4),
  seed: z.number().int().min(0).optional(),
  feasibilityThreshold: z.number().min(0).max(1, 'a probability between 0 and 1').optional(),
});
