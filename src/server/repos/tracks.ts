/**
 * Motion tracks of a trial: the CSV is parsed into per-hop metrics (src/domain/tracks), stored with its
 * mapping and hops, and the campaign's responses whose names match a track metric get observations of
 * origin 'track'. A value the operator typed is never overwritten: both are answered so the operator
 * can amend; a value from an earlier track is replaced by an amendment (the old value stays).
 */
import { DomainError, invalidInput } from '@/domain/errors';
import type { ResponseDefinition } from '@/domain/factors';
import { unitDefinition } from '@/domain/metrics/units';
import { trackMetrics, type TrackMetrics, type TrackMetricsOptions } from '@/domain/tracks';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { getCampaign } from './campaigns';
import { derivedObservations, type DerivedObservation } from './track-observations';

export { derivedObservations, type DerivedObservation };

/** Track metrics options without the CSV; `fileName` is stored with the track. */
export type TrackUpload = TrackMetricsOptions & { fileName?: string };

export interface StoredTrackResult {
  trackId: string;
  metrics: TrackMetrics;
  /** Observations written from the track. */
  stored: DerivedObservation[];
  /** Track values not stored because the operator typed a value: both are given. */
  kept: { name: string; typed: number; fromTrack: number; unit: string }[];
}

/** Typed energy of the trial in joules, when a response named like energy with an energy unit was logged. */
function typedEnergyJoules(responses: readonly ResponseDefinition[], observations: { name: string; value: number }[]): number | undefined {
  for (const o of observations) {
    const r = responses.find((x) => x.name === o.name);
    if (!r || !/energy/i.test(r.name) || /per.?hop/i.test(r.name)) continue;
    const u = unitDefinition(r.unit ?? '');
    if (u?.quantity === 'energy' && o.value >= 0) return o.value * u.scale;
  }
  return undefined;
}

/** Parse a trial's track, store it and its derived observations in one transaction. */
export async function storeTrack(campaignId: string, trialId: string, csv: string, upload: TrackUpload, actor = 'local'): Promise<StoredTrackResult> {
  const campaign = await getCampaign(campaignId);
  const client = await db();
  const trial = await client.trial.findFirst({ where: { id: trialId, campaignId }, include: { observations: true, robot: true } });
  if (!trial) throw new DomainError('not_found', 'no such trial in this campaign', 'trialId');
  if (csv.trim() === '') throw invalidInput('(body)', 'the track file is empty; choose a CSV file with a header line');
  const { fileName, ...options } = upload;
  const massGrams = options.massGrams ?? trial.robot?.massGrams;
  const energyJoules = options.energyJoules ?? typedEnergyJoules(campaign.responses, trial.observations);
  const metrics = trackMetrics(csv, { ...options, massGrams, energyJoules });
  if (metrics.hops.length === 0) {
    metrics.warnings.push('no hop was found in this track; check the z column and its unit');
  }
  const derived = derivedObservations(metrics.summary, campaign.responses);
  const stored: DerivedObservation[] = [];
  const kept: StoredTrackResult['kept'] = [];
  const trackId = await client.$transaction(async (tx) => {
    const track = await tx.track.create({
      data: {
        trialId: trial.id,
        fileName: fileName?.trim() || 'track.csv',
        content: csv,
        mappingJson: JSON.stringify({ ...options, massGrams, energyJoules }),
        hopsJson: JSON.stringify({ hops: metrics.hops, summary: metrics.summary, warnings: metrics.warnings }),
      },
    });
    for (const d of derived) {
      const existing = trial.observations.find((o) => o.name === d.name);
      if (!existing) {
        await tx.observation.create({ data: { trialId: trial.id, name: d.name, value: d.value, unit: d.unit, origin: 'track' } });
        stored.push(d);
      } else if (existing.origin === 'track') {
        if (existing.value === d.value) continue;
        await tx.observation.update({ where: { id: existing.id }, data: { value: d.value } });
        await tx.amendment.create({
          data: { trialId: trial.id, field: d.name, oldValue: String(existing.value), newValue: String(d.value), reason: `recomputed from track ${track.fileName}`, author: actor },
        });
        stored.push(d);
      } else {
        kept.push({ name: d.name, typed: existing.value, fromTrack: d.value, unit: d.unit });
      }
    }
    await audit(tx, actor, 'add-track', 'trial', trial.id, null, { trackId: track.id, fileName: track.fileName, hops: metrics.hops.length, stored, kept });
    return track.id;
  });
  return { trackId, metrics, stored, kept };
}
