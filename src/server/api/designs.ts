/** POST /api/v1/designs: the request schema and the handler (stateless, so rig scripts can call it). */
import { z } from 'zod';
import { generateDesign, DESIGN_METHODS, type DesignResult, type DesignSpec } from '@/domain/design';
import { designOffThread } from '@/server/jobs/off-thread';
import { parseWith } from './validation';

const factorName = z.string().regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, 'a factor name starts with a letter and has only letters, digits and _ (at most 40)');
const common = { name: factorName, unit: z.string().max(40).optional(), hardToChange: z.boolean().optional() };

export const factorSchema = z.discriminatedUnion('kind', [
  z.object({ ...common, kind: z.literal('continuous'), low: z.number(), high: z.number() }),
  z.object({ ...common, kind: z.literal('discrete'), values: z.array(z.number()).min(2).max(50) }),
  z.object({ ...common, kind: z.literal('categorical'), levels: z.array(z.string().min(1).max(60)).min(2).max(50) }),
]);

const pointSchema = z.record(z.string(), z.union([z.number(), z.string()]));

export const designSpecSchema = z.object({
  factors: z.array(factorSchema).min(1).max(30),
  method: z.enum(DESIGN_METHODS as [DesignSpec['method'], ...DesignSpec['method'][]]),
  runs: z.number().int().min(1).max(10_000).optional(),
  model: z.enum(['main-effects', 'interactions', 'quadratic']).optional(),
  criterion: z.enum(['D', 'I']).optional(),
  resolution: z.number().int().min(3).max(8).optional(),
  generators: z.array(z.string().min(1).max(60)).max(30).optional(),
  centerPoints: z.number().int().min(0).max(100).optional(),
  alpha: z.union([z.enum(['rotatable', 'orthogonal', 'face-centred']), z.number().positive().max(10)]).optional(),
  replicates: z.number().int().min(1).max(20).optional(),
  blocks: z.number().int().min(1).max(100).optional(),
  blockGenerators: z.array(z.string().min(1, 'a block generator is a word such as "ABC"').max(200)).max(6, 'at most 6 block generators (64 blocks)').optional(),
  blockEffects: z.enum(['fixed', 'random']).optional(),
  wholePlots: z.number().int().min(1).max(1000).optional(),
  constraints: z
    .array(z.object({ terms: z.record(z.string(), z.number()), min: z.number().optional(), max: z.number().optional() }))
    .max(50)
    .optional(),
  disallowed: z.array(z.object({ levels: pointSchema })).max(200).optional(),
  existingRuns: z.array(pointSchema).max(10_000).optional(),
  seed: z.number().int().optional(),
  starts: z.number().int().min(1).max(10_000).optional(),
  varianceRatio: z.number().min(0).max(1000).optional(),
  power: z
    .object({ effectSize: z.number().positive().optional(), sigma: z.number().positive().optional(), alpha: z.number().gt(0).lt(1).optional() })
    .optional(),
});

export type DesignSpecInput = z.infer<typeof designSpecSchema>;

export function handleDesignRequest(body: unknown): DesignResult {
  const spec = parseWith(designSpecSchema, body) as DesignSpec;
  return generateDesign(spec);
}

/**
 * The route's handler: an optimal-design search runs in the worker pool (awaited) so the server's event
 * loop stays free; the constructions are quick and run here.
 */
export async function handleDesignRequestOffThread(body: unknown): Promise<DesignResult> {
  const spec = parseWith(designSpecSchema, body) as DesignSpec;
  return designOffThread(spec);
}

