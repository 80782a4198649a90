/**
 * Motion tracks of a trial: the CSV is parsed into per-hop metrics (src/domain/tracks), stored with its
 * mapping and hops, and the campaign's responses whose names match a track metric get observations of
 * origin 'track'. A value the operator typed is never overwritten: both are answered so the operator
 * can amend; a value from an earlier track is replaced by an amendment (the old value stays).
 */
import { DomainError, invalidInput } from '@/domain/errors';
import type { ResponseDefinition } from '@/domain/factors';
import { unitDefinition } from '@/domain/metrics/units';
import { hopMetrics, trackMetrics, type TrackMetrics, type TrackMetricsOptions } from '@/domain/tracks';
import { readMcapPoses } from '@/domain/tracks/mcap';
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

/** A downsampled height profile (min and max of each time bucket), s and m, for the page's plot. */
export interface HeightProfile {
  t: number[];
  z: number[];
}

const PROFILE_BUCKETS = 600;

export function heightProfile(t: ArrayLike<number>, z: ArrayLike<number>, length = t.length): HeightProfile {
  const out: HeightProfile = { t: [], z: [] };
  const per = Math.max(1, Math.ceil(length / PROFILE_BUCKETS));
  for (let start = 0; start < length; start += per) {
    const end = Math.min(length, start + per);
    let lo = start;
    let hi = start;
    for (let i = start; i < end; i++) {
      if (z[i]! < z[lo]!) lo = i;
      if (z[i]! > z[hi]!) hi = i;
    }
    for (const i of lo === hi ? [lo] : lo < hi ? [lo, hi] : [hi, lo]) {
      out.t.push(t[i]!);
      out.z.push(z[i]!);
    }
  }
  return out;
}

type TrialWithContext = NonNullable<Awaited<ReturnType<typeof loadTrial>>>;

async function loadTrial(campaignId: string, trialId: string) {
  const client = await db();
  const trial = await client.trial.findFirst({ where: { id: trialId, campaignId }, include: { observations: true, robot: true } });
  if (!trial) throw new DomainError('not_found', 'no such trial in this campaign', 'trialId');
  return trial;
}

/** Store a computed track and the observations it feeds, in one transaction. */
async function persistTrack(
  campaign: Awaited<ReturnType<typeof getCampaign>>, trial: TrialWithContext, metrics: TrackMetrics, content: string, fileName: string, mapping: unknown, actor: string,
): Promise<Omit<StoredTrackResult, 'metrics'>> {
  if (metrics.hops.length === 0) metrics.warnings.push('no hop was found in this track; check the height column or topic and its unit');
  const derived = derivedObservations(metrics.summary, campaign.responses);
  const stored: DerivedObservation[] = [];
  const kept: StoredTrackResult['kept'] = [];
  const client = await db();
  const trackId = await client.$transaction(async (tx) => {
    const track = await tx.track.create({
      data: {
        trialId: trial.id,
        fileName,
        content,
        mappingJson: JSON.stringify(mapping),
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
  return { trackId, stored, kept };
}

/** Parse a trial's track CSV, store it and its derived observations in one transaction. */
export async function storeTrack(campaignId: string, trialId: string, csv: string, upload: TrackUpload, actor = 'local'): Promise<StoredTrackResult> {
  const campaign = await getCampaign(campaignId);
  const trial = await loadTrial(campaignId, trialId);
  if (csv.trim() === '') throw invalidInput('(body)', 'the track file is empty; choose a CSV file with a header line');
  const { fileName, ...options } = upload;
  const massGrams = options.massGrams ?? trial.robot?.massGrams;
  const energyJoules = options.energyJoules ?? typedEnergyJoules(campaign.responses, trial.observations);
  const metrics = trackMetrics(csv, { ...options, massGrams, energyJoules });
  const rest = await persistTrack(campaign, trial, metrics, csv, fileName?.trim() || 'track.csv', { ...options, massGrams, energyJoules }, actor);
  return { ...rest, metrics };
}

export interface McapUpload {
  topic: string;
  massGrams?: number;
  energyJoules?: number;
  /** Landing target, m (positions in MCAP pose messages are metres). */
  targetX?: number;
  targetY?: number;
  fileName?: string;
}

/** Read one topic's poses from an MCAP log, store the log (base64) and its derived observations. */
export async function storeMcapTrack(campaignId: string, trialId: string, bytes: Uint8Array, upload: McapUpload, actor = 'local'): Promise<StoredTrackResult & { profile: HeightProfile }> {
  const campaign = await getCampaign(campaignId);
  const trial = await loadTrial(campaignId, trialId);
  if (bytes.length === 0) throw invalidInput('(body)', 'the MCAP file is empty; choose the log file of this trial');
  const poses = readMcapPoses(bytes, upload.topic);
  const massGrams = upload.massGrams ?? trial.robot?.massGrams;
  const energyJoules = upload.energyJoules ?? typedEnergyJoules(campaign.responses, trial.observations);
  const metrics = hopMetrics(poses, {
    massKg: massGrams !== undefined ? massGrams / 1000 : undefined,
    energyJ: energyJoules,
    targetX: upload.targetX,
    targetY: upload.targetY,
  });
  if (poses.skipped > 0) metrics.warnings.unshift(`${poses.skipped} messages on '${upload.topic}' carried no position and were skipped`);
  const mapping = { format: 'mcap', topic: upload.topic, lengthUnit: 'm', timeUnit: 's', massGrams, energyJoules, targetX: upload.targetX, targetY: upload.targetY };
  const rest = await persistTrack(campaign, trial, metrics, `mcap;base64,${Buffer.from(bytes).toString('base64')}`, upload.fileName?.trim() || 'track.mcap', mapping, actor);
  return { ...rest, metrics, profile: heightProfile(poses.t, poses.z, poses.length) };
}
