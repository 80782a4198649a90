/** POST /api/v1/analyses: the request schema and the handler (stateless). */
import { z } from 'zod';
import { analyze, type AnalysisRequest, type AnalysisResult } from '@/domain/analysis';
import { startAnalysisThreads } from '@/server/compute/triangle-threads';
import { parseWith } from './validation';

const name = z.string().regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, 'a column name starts with a letter and has only letters, digits and _ (at most 40)');
const common = { name, unit: z.string().max(40).optional(), hardToChange: z.boolean().optional() };

const analysisFactorSchema = z.discriminatedUnion('kind', [
  z.object({ ...common, kind: z.literal('continuous'), low: z.number(), high: z.number() }),
  z.object({ ...common, kind: z.literal('discrete'), values: z.array(z.number()).min(2).max(50) }),
  z.object({ ...common, kind: z.literal('categorical'), levels: z.array(z.string().min(1).max(60)).min(2).max(50) }),
]);

const cell = z.union([z.number(), z.string().max(200), z.null()]);

export const analysisRequestSchema = z.object({
  data: z.array(z.record(z.string(), cell)).min(1, 'send at least one run').max(200_000),
  response: name,
  terms: z.array(z.string().min(1).max(200)).max(500),
  intercept: z.boolean().optional(),
  factors: z.array(analysisFactorSchema).max(50).optional(),
  coding: z.enum(['natural', 'coded']).optional(),
  family: z.enum(['gaussian', 'binomial']).optional(),
  diagnostics: z.boolean().optional(),
  /** Column naming each run's whole plot: REML with a whole-plot random effect, Kenward–Roger df. */
  wholePlot: name.optional(),
});

export type AnalysisRequestInput = z.infer<typeof analysisRequestSchema>;

/** Validate the body, run the analysis. JSON turns non-finite numbers (e.g. F of an exact fit) into null. */
export function handleAnalysisRequest(body: unknown): AnalysisResult {
  // Large fits share their least-squares triangle with a helper thread once it has loaded.
  void startAnalysisThreads();
  const request = parseWith(analysisRequestSchema, body) as AnalysisRequest;
  return analyze(request);
}
