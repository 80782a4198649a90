/**
 * The rig tablet's combined log entry: start and finish of one trial sent as ONE idempotent request,
 * so that a queue kept offline can be replayed with no server round-trip in between. The readings are
 * checked before anything is stored (a refused entry stores nothing); a replay with the same key
 * returns the stored trial and stores nothing new; a replay that finds the stored trial changed since,
 * or a run already logged from another tablet, answers 409 with both versions, never overwriting.
 */
import { DomainError, invalidInput } from '@/domain/errors';
import { observationField } from '@/domain/metrics/standard-readings';
import { checkTrialEntry } from '@/domain/metrics/trial-entry';
import type { z } from 'zod';
import type { trialLogSchema } from '@/server/api/schemas/rig';
import { db } from '@/server/db/client';
import { cachedCampaign } from './campaigns';
import { keyIsStored, storeLoggedTrial, VERSION_AFTER_LOG, type LoggedValues, type LogWrite } from './trial-log-store';
import { finishTrial } from './trials';

export type TrialLogInput = z.output<typeof trialLogSchema>;
export type { LoggedValues };

function sentValues(input: TrialLogInput): LoggedValues {
  const passed = input.status === 'failed' ? false : input.passed ?? (input.status === 'done' ? true : null);
  return { runId: input.runId, status: input.status, passed, failureReason: input.failureReason, notes: input.notes, observations: { ...input.observations } };
}

type StoredTrial = {
  id: string;
  runId: string;
  status: string;
  passed: boolean | null;
  failureReason: string;
  notes: string;
  version: number;
  idempotencyKey: string | null;
  observations: { name: string; value: number }[];
  amendments: { field: string; oldValue: string; newValue: string; reason: string }[];
};

function storedValues(t: StoredTrial): LoggedValues {
  return {
    runId: t.runId,
    status: t.status,
    passed: t.passed,
    failureReason: t.failureReason,
    notes: t.notes,
    observations: Object.fromEntries(t.observations.map((o) => [o.name, o.value])),
  };
}

function sameValues(a: LoggedValues, b: LoggedValues): boolean {
  const ka = Object.keys(a.observations).sort();
  const kb = Object.keys(b.observations).sort();
  if (ka.join('\u0000') !== kb.join('\u0000')) return false;
  if (ka.some((k) => a.observations[k] !== b.observations[k])) return false;
  return a.runId === b.runId && a.status === b.status && a.passed === b.passed && a.failureReason === b.failureReason && a.notes === b.notes;
}

/**
 * Check an entry against the campaign (held in memory) and the plausibility rules before anything is
 * stored, and turn it into the rows to write. Refuses what a separate start and finish would refuse.
 */
async function prepareEntry(campaignId: string, input: TrialLogInput, key: string, actor: string, now: Date) {
  const campaign = await cachedCampaign(campaignId);
  const robot = input.robotId ? campaign.robots.find((r) => r.id === input.robotId) : undefined;
  if (input.robotId && !robot) throw invalidInput('robotId', 'no such robot in this campaign; choose one from the list');
  if (input.rigId && !campaign.rigs.some((r) => r.id === input.rigId)) throw invalidInput('rigId', 'no such rig in this campaign');
  const startedAt = input.startedAt ? new Date(input.startedAt) : now;
  if (startedAt.getTime() > now.getTime() + 120_000) throw invalidInput('startedAt', 'the start time is in the future; check the tablet clock');
  const finishedAt = input.finishedAt ? new Date(input.finishedAt) : now;
  if (finishedAt.getTime() < startedAt.getTime()) throw invalidInput('finishedAt', 'the finish time is before the start time; check the tablet clock');
  const passed = input.status === 'failed' ? false : input.passed ?? (input.status === 'done' ? true : undefined);
  // The same check as the tablet's: known readings (standard or response) and plausible values.
  const check = checkTrialEntry(
    campaign.responses,
    input.observations,
    { passed, failureReason: input.failureReason, startedAt: startedAt.toISOString(), finishedAt: finishedAt.toISOString() },
    { now: now.toISOString(), robotMassKg: robot ? robot.massGrams / 1000 : null, robotHeightM: robot?.heightMm ? robot.heightMm / 1000 : null },
  );
  if (check.errors.length) throw invalidInput(check.errors[0]!.field, check.errors[0]!.message, { errors: check.errors, warnings: check.warnings });
  const write: LogWrite = {
    campaignId,
    runId: input.runId,
    rigId: input.rigId ?? null,
    robotId: input.robotId ?? null,
    operator: input.operator,
    status: input.status,
    passed: passed ?? null,
    failureReason: input.failureReason,
    notes: input.notes,
    startedAt,
    finishedAt,
    idempotencyKey: key,
    repeat: input.repeat,
    observations: Object.entries(input.observations).map(([name, value]) => ({ name, value, unit: observationField(campaign.responses, name)?.unit ?? '' })),
    actor,
    now,
  };
  return { write, warnings: check.warnings };
}

async function findByKey(key: string): Promise<StoredTrial | null> {
  const client = await db();
  // Read inside a transaction so that a finish being written by a concurrent replay is seen whole.
  return client.$transaction((tx) =>
    tx.trial.findUnique({
      where: { idempotencyKey: key },
      include: { observations: { select: { name: true, value: true } }, amendments: { select: { field: true, oldValue: true, newValue: true, reason: true }, orderBy: { createdAt: 'asc' } } },
    }),
  );
}

/** Finish a started trial; when a concurrent replay of the same key finished it first, answer as a replay. */
async function finishOrReplay(campaignId: string, key: string, trialId: string, version: number, input: TrialLogInput, actor: string, now: Date) {
  try {
    const { trial, warnings } = await finishTrial(campaignId, trialId, { ...finishPart(input), version }, actor, now);
    return { trial, warnings, replayed: false };
  } catch (e) {
    if (e instanceof DomainError && e.code === 'conflict') {
      const again = await findByKey(key);
      if (again && again.status !== 'running') return replay(campaignId, key, again, input, actor, now);
    }
    throw e;
  }
}

/** Answer a replay of a key that is already stored. */
async function replay(
  campaignId: string, key: string, stored: StoredTrial, input: TrialLogInput, actor: string, now: Date,
): Promise<{ trial: Awaited<ReturnType<typeof finishTrial>>['trial']; warnings: { field: string; message: string }[]; replayed: boolean }> {
  if (stored.status === 'running') {
    // The start is stored but its finish is not (yet): finish it now, or find it finished by a concurrent copy.
    return finishOrReplay(campaignId, key, stored.id, stored.version, input, actor, now);
  }
  const mine = sentValues(input);
  const theirs = storedValues(stored);
  if (stored.version !== VERSION_AFTER_LOG || stored.amendments.length > 0 || !sameValues(mine, theirs)) {
    throw new DomainError('conflict', 'this entry was stored before and has been changed since; compare both versions and correct with an amendment if needed', 'Idempotency-Key', {
      trialId: stored.id,
      currentVersion: stored.version,
      stored: theirs,
      sent: mine,
      amendments: stored.amendments,
    });
  }
  const client = await db();
  const trial = await client.trial.findUniqueOrThrow({ where: { id: stored.id }, include: { observations: true } });
  return { trial, warnings: [] as { field: string; message: string }[], replayed: true };
}

function finishPart(input: TrialLogInput) {
  return {
    observations: input.observations,
    passed: input.passed,
    failureReason: input.failureReason,
    notes: input.notes,
    finishedAt: input.finishedAt,
    status: input.status,
  };
}

/**
 * Start and finish one trial in one idempotent step: checked first, then the trial, its observations
 * and its audit event are written in one transaction. Answers the stored trial, the plausibility
 * warnings and whether this was a replay of an entry stored before.
 */
export async function logTrial(campaignId: string, input: TrialLogInput, key: string, actor = 'local', now = new Date()) {
  if (await keyIsStored(key)) {
    const stored = await findByKey(key);
    if (stored) return replay(campaignId, key, stored, input, actor, now);
  }
  const { write, warnings } = await prepareEntry(campaignId, input, key, actor, now);
  const outcome = await storeLoggedTrial(write);
  if (outcome.kind === 'exists') {
    // A copy of this entry was stored a moment before (a concurrent replay): answer like a replay.
    const stored = await findByKey(key);
    if (stored) return replay(campaignId, key, stored, input, actor, now);
    throw new DomainError('conflict', 'this entry is being stored by another request; send it again', 'Idempotency-Key');
  }
  return { trial: outcome.trial, warnings, replayed: false };
}

/** One trial with its readings, amendments and tracks (without the raw track text). */
export async function getTrial(campaignId: string, trialId: string) {
  const client = await db();
  const trial = await client.trial.findFirst({
    where: { id: trialId, campaignId },
    include: {
      observations: true,
      amendments: { orderBy: { createdAt: 'asc' } },
      run: true,
      tracks: { select: { id: true, fileName: true, mappingJson: true, hopsJson: true, createdAt: true }, orderBy: { createdAt: 'asc' } },
    },
  });
  if (!trial) throw new DomainError('not_found', 'no such trial in this campaign', 'trialId');
  return trial;
}

/** A logged trial as the rig page lists it: readings with their origin, amendments, track summaries. */
export interface RigTrialView {
  id: string;
  runNumber: number;
  status: string;
  passed: boolean | null;
  failureReason: string;
  notes: string;
  startedAt: string;
  observations: { name: string; value: number; unit: string; origin: string }[];
  amendments: { field: string; oldValue: string; newValue: string; reason: string; createdAt: string }[];
  tracks: { id: string; fileName: string; hopCount: number; createdAt: string }[];
}

/** The latest finished trials of one rig, newest first. */
export async function rigTrials(campaignId: string, rigId: string, limit = 12): Promise<RigTrialView[]> {
  const client = await db();
  const trials = await client.trial.findMany({
    where: { campaignId, rigId, status: { not: 'running' } },
    orderBy: { startedAt: 'desc' },
    take: limit,
    include: {
      run: { select: { runNumber: true } },
      observations: { orderBy: { name: 'asc' } },
      amendments: { orderBy: { createdAt: 'asc' } },
      tracks: { select: { id: true, fileName: true, hopsJson: true, createdAt: true }, orderBy: { createdAt: 'asc' } },
    },
  });
  return trials.map((t) => ({
    id: t.id,
    runNumber: t.run.runNumber,
    status: t.status,
    passed: t.passed,
    failureReason: t.failureReason,
    notes: t.notes,
    startedAt: t.startedAt.toISOString(),
    observations: t.observations.map((o) => ({ name: o.name, value: o.value, unit: o.unit, origin: o.origin })),
    amendments: t.amendments.map((a) => ({ field: a.field, oldValue: a.oldValue, newValue: a.newValue, reason: a.reason, createdAt: a.createdAt.toISOString() })),
    tracks: t.tracks.map((k) => {
      let hopCount = 0;
      try {
        hopCount = (JSON.parse(k.hopsJson) as { hops?: unknown[] }).hops?.length ?? 0;
      } catch {
        /* an unreadable summary counts no hops */
      }
      return { id: k.id, fileName: k.fileName, hopCount, createdAt: k.createdAt.toISOString() };
    }),
  }));
}
