/** Next-trial proposals: computed from the campaign's runs, stored with their reason, accepted as runs. */
import { nextRunByPredictionVariance } from '@/domain/design';
import { DomainError } from '@/domain/errors';
import type { Point, StandardModel } from '@/domain/factors';
import type { SuggestionRequest, SuggestionResult, SurrogateSlice } from '@/domain/surrogate';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { domainFactors, getCampaign } from './campaigns';
import { parseJson } from './mappers';
import { addRun, listRuns } from './runs';

/**
 * Propose the run that the current runs know least about: the candidate with the largest prediction
 * variance x'(X'X)^-1 x under the chosen model, over all runs planned or tried so far.
 */
export async function proposeNextTrial(campaignId: string, model: StandardModel, seed = 1, actor = 'local') {
  const campaign = await getCampaign(campaignId);
  const factors = domainFactors(campaign);
  const runs = await listRuns(campaignId);
  const points = runs.filter((r) => r.state !== 'skipped').map((r) => r.values);
  const next = nextRunByPredictionVariance(factors, model, points, { seed });
  const reason =
    `largest prediction variance under the ${model} model: n·x'(X'X)⁻¹x = ${next.scaledPredictionVariance.toFixed(2)} ` +
    `over ${points.length} planned or tried runs — the setting the campaign knows least about`;
  const client = await db();
  const s = await client.$transaction(async (tx) => {
    const row = await tx.suggestion.create({
      data: {
        campaignId,
        strategy: 'prediction-variance',
        valuesJson: JSON.stringify(next.values),
        reason,
        detailsJson: JSON.stringify({ model, seed, scaledPredictionVariance: next.scaledPredictionVariance }),
      },
    });
    await audit(tx, actor, 'propose', 'suggestion', row.id, null, { values: next.values, reason });
    return row;
  });
  return { id: s.id, values: next.values, reason, scaledPredictionVariance: next.scaledPredictionVariance, model };
}

export async function listSuggestions(campaignId: string) {
  const client = await db();
  const rows = await client.suggestion.findMany({ where: { campaignId }, orderBy: { createdAt: 'desc' }, take: 50 });
  return rows.map((r) => ({
    id: r.id,
    strategy: r.strategy,
    values: parseJson<Point>(r.valuesJson, {}),
    reason: r.reason,
    status: r.status,
    runId: r.runId,
    createdAt: r.createdAt.toISOString(),
    details: parseJson<Record<string, unknown>>(r.detailsJson, {}),
  }));
}

export async function acceptSuggestion(campaignId: string, suggestionId: string, actor = 'local') {
  const client = await db();
  const s = await client.suggestion.findFirst({ where: { id: suggestionId, campaignId } });
  if (!s) throw new DomainError('not_found', 'no such proposal in this campaign', 'suggestionId');
  if (s.status === 'accepted' && s.runId) {
    const runs = await listRuns(campaignId);
    const run = runs.find((r) => r.id === s.runId);
    if (run) return { run, replayed: true };
  }
  const run = await addRun(campaignId, parseJson<Point>(s.valuesJson, {}), 'suggestion', actor, s.reason);
  await client.$transaction(async (tx) => {
    await tx.suggestion.update({ where: { id: s.id }, data: { status: 'accepted', runId: run.id } });
    await audit(tx, actor, 'accept', 'suggestion', s.id, { status: s.status }, { status: 'accepted', runId: run.id });
  });
  return { run, replayed: false };
}

export interface BatchInput {
  strategy: 'improve' | 'explore' | 'refine' | 'confirm';
  response: string;
  count: number;
  seed?: number;
  feasibilityThreshold?: number;
}

/**
 * A batch of next trials from the Gaussian-process surrogate of one response, fitted to the logged
 * trials (failed trials train the feasibility model). Surface swaps cost the factor's change minutes.
 * Each proposal is stored with its reason; the answer also carries the surrogate's summary and its
 * mean ± sd along every factor, through the best proposal, for the picture on the page.
 */
export async function proposeSurrogateBatch(campaignId: string, input: BatchInput, actor = 'local') {
  const prepared = await surrogateBatchRequest(campaignId, input);
  const { runInPool } = await import('@/server/jobs/pool');
  const { result } = await runInPool('surrogate-batch', prepared.request);
  return storeSurrogateBatch(prepared, result as SurrogateBatchComputed, actor);
}

/** What the surrogate batch of a campaign needs: the stateless request built from its logged trials. */
export interface SurrogateBatchPrepared {
  campaignId: string;
  input: BatchInput;
  response: { name: string; unit: string };
  request: SuggestionRequest;
}

/** The worker's answer for a surrogate batch: the suggestions, the model summary and the slices. */
export type SurrogateBatchComputed = SuggestionResult & { slices: SurrogateSlice[] };

/** Build the stateless suggestion request from a campaign's factors, responses and logged trials. */
export async function surrogateBatchRequest(campaignId: string, input: BatchInput): Promise<SurrogateBatchPrepared> {
  const { campaignData } = await import('./analyses');
  const campaign = await getCampaign(campaignId);
  const response = campaign.responses.find((r) => r.name === input.response);
  if (!response) {
    throw new DomainError('invalid_input', `"${input.response}" is not a response of this campaign; known: ${campaign.responses.map((r) => r.name).join(', ')}`, 'response');
  }
  const { rows } = await campaignData(campaignId);
  const factors = domainFactors(campaign);
  const data = rows
    .filter((r) => typeof r[response.name] === 'number' || r.passed === 0)
    .map((r) => {
      const row: Record<string, number | string | boolean> = {};
      for (const f of factors) row[f.name] = r[f.name]!;
      if (typeof r[response.name] === 'number') row[response.name] = r[response.name]!;
      if (r.passed === 0) row.failed = true;
      return row;
    });
  if (data.filter((d) => typeof d[response.name] === 'number').length < 3) {
    throw new DomainError('invalid_input', `the surrogate needs at least 3 logged trials with ${response.name}; log more trials first`, 'response');
  }
  const swapCost = Object.fromEntries(campaign.factors.filter((f) => f.hardToChange && f.changeMinutes > 0).map((f) => [f.name, f.changeMinutes]));
  const request: SuggestionRequest = {
    factors,
    data: data as SuggestionRequest['data'],
    response: response.name,
    goal: response.goal === 'minimize' ? 'minimize' : 'maximize',
    count: input.count,
    strategy: input.strategy,
    swapCost,
    feasibilityThreshold: input.feasibilityThreshold,
    seed: input.seed ?? 1,
    trialMinutes: campaign.trialMinutes,
  };
  return { campaignId, input, response: { name: response.name, unit: response.unit ?? '' }, request };
}

/** Store each proposal of a computed batch with its reason (audited) and answer the page's shape. */
export async function storeSurrogateBatch(prepared: SurrogateBatchPrepared, computed: SurrogateBatchComputed, actor = 'local') {
  const { campaignId, input, response, request } = prepared;
  const client = await db();
  const stored = await client.$transaction(async (tx) => {
    const out = [];
    for (const s of computed.suggestions) {
      const row = await tx.suggestion.create({
        data: {
          campaignId,
          strategy: input.strategy,
          valuesJson: JSON.stringify(s.values),
          reason: s.reason,
          detailsJson: JSON.stringify({ response: response.name, mean: s.mean, sd: s.sd, acquisition: s.acquisition, feasibility: s.feasibility }),
        },
      });
      await audit(tx, actor, 'propose', 'suggestion', row.id, null, { strategy: input.strategy, values: s.values, reason: s.reason });
      out.push({ id: row.id, ...s });
    }
    return out;
  });
  return { response: response.name, unit: response.unit, goal: request.goal, strategy: input.strategy, suggestions: stored, model: computed.model, slices: computed.slices };
}
