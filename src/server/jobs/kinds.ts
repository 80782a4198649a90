/**
 * The kinds of job the API accepts and how each becomes a task for the pool. A stateless kind carries the
 * same body as its synchronous route; a campaign-bound one is built from the campaign's records when it
 * is submitted (the job then runs on what the campaign held at that moment) and stores its outcome
 * (e.g. the proposals of a surrogate batch) when it finishes.
 */
import type { DesignSpec } from '@/domain/design';
import { DomainError, isDomainError } from '@/domain/errors';
import type { SuggestionRequest } from '@/domain/surrogate';
import { designSpecSchema } from '@/server/api/designs';
import { campaignDesignSchema, suggestionBatchSchema } from '@/server/api/schemas/campaign';
import { suggestionRequestSchema } from '@/server/api/suggestions';
import { parseWith } from '@/server/api/validation';
import { domainFactors, getCampaign } from '@/server/repos/campaigns';
import { campaignDesignSpec } from '@/server/repos/runs';
import { storeSurrogateBatch, surrogateBatchRequest, type SurrogateBatchComputed, type SurrogateBatchPrepared } from '@/server/repos/suggestions';
import type { Finisher, JobEnvelope } from './runner';

export const JOB_KINDS = ['design-search', 'suggestions'] as const;
export type JobKind = (typeof JOB_KINDS)[number];

/** Validate a job's input (errors name the field under `input.`) and build what its row will hold. */
export async function prepareJob(kind: JobKind, input: unknown, campaignId?: string): Promise<JobEnvelope> {
  if (kind === 'design-search') {
    if (campaignId) {
      const body = parseWith(campaignDesignSchema, input, 'input');
      const campaign = await getCampaign(campaignId);
      return { task: 'design', input: campaignDesignSpec(domainFactors(campaign), body) };
    }
    return { task: 'design', input: parseWith(designSpecSchema, input, 'input') as DesignSpec };
  }
  if (campaignId) {
    const body = parseWith(suggestionBatchSchema, input, 'input');
    const prepared = await surrogateBatchRequest(campaignId, body).catch((e: unknown) => {
      if (isDomainError(e) && e.code === 'invalid_input' && e.field) throw new DomainError(e.code, e.message, `input.${e.field}`, e.details);
      throw e;
    });
    const { request, ...rest } = prepared;
    return { task: 'surrogate-batch', input: request, after: { type: 'store-surrogate-batch', prepared: rest } };
  }
  return { task: 'suggestions', input: parseWith(suggestionRequestSchema, input, 'input') as SuggestionRequest };
}

export const finishers: Record<string, Finisher> = {
  'store-surrogate-batch': async (envelope, result, job) => {
    const rest = envelope.after!.prepared as Omit<SurrogateBatchPrepared, 'request'>;
    return storeSurrogateBatch({ ...rest, request: envelope.input as SuggestionRequest }, result as SurrogateBatchComputed, job.createdBy);
  },
};
