/** Next-trial proposals: computed from the campaign's runs, stored with their reason, accepted as runs. */
import { nextRunByPredictionVariance } from '@/domain/design';
import { DomainError } from '@/domain/errors';
import type { Point, StandardModel } from '@/domain/factors';
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
