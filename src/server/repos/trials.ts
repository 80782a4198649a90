/**
 * Trials at the rig: start, finish with readings, amend. Writes are idempotent by a client-made key
 * (a tablet that replays its queue never creates a second trial), finishing checks the version the
 * tablet saw (a conflicting edit is answered 409, never silently overwritten), and a correction is
 * an amendment: the original value stays.
 */
import { DomainError, invalidInput } from '@/domain/errors';
import { observationField, standardReadings } from '@/domain/metrics/standard-readings';
import { checkTrialEntry } from '@/domain/metrics/trial-entry';
import type { z } from 'zod';
import type { amendmentSchema, trialFinishSchema, trialStartSchema } from '@/server/api/schemas/campaign';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { readAllPaged } from './paged';
import { cachedCampaign } from './campaigns';

export type TrialStart = z.output<typeof trialStartSchema>;
export type TrialFinish = z.output<typeof trialFinishSchema>;
export type AmendmentInput = z.output<typeof amendmentSchema>;

/** The standard rig readings of a trial (src/domain/metrics/standard-readings.ts). */
export { standardReadings };

export async function startTrial(campaignId: string, input: TrialStart, idempotencyKey: string | null, actor = 'local', now = new Date()) {
  const client = await db();
  if (idempotencyKey) {
    const existing = await client.trial.findUnique({ where: { idempotencyKey } });
    if (existing) return { trial: existing, replayed: true };
  }
  const run = await client.run.findFirst({ where: { id: input.runId, campaignId } });
  if (!run) throw invalidInput('runId', 'no such run in this campaign; pick a run from the queue');
  const startedAt = input.startedAt ? new Date(input.startedAt) : now;
  if (startedAt.getTime() > now.getTime() + 120_000) throw invalidInput('startedAt', 'the start time is in the future; check the tablet clock');
  try {
    const trial = await client.$transaction(async (tx) => {
      const t = await tx.trial.create({
        data: {
          campaignId,
          runId: run.id,
          rigId: input.rigId ?? null,
          robotId: input.robotId ?? null,
          operator: input.operator,
          status: 'running',
          startedAt,
          idempotencyKey,
        },
      });
      await audit(tx, actor, 'start-trial', 'trial', t.id, null, { runId: run.id, rigId: input.rigId, robotId: input.robotId, startedAt });
      return t;
    });
    return { trial, replayed: false };
  } catch (e) {
    // Two replays of the same key racing: the second finds the first.
    if (idempotencyKey) {
      const existing = await client.trial.findUnique({ where: { idempotencyKey } });
      if (existing) return { trial: existing, replayed: true };
    }
    throw e;
  }
}

export async function finishTrial(campaignId: string, trialId: string, input: TrialFinish, actor = 'local', now = new Date()) {
  const campaign = await cachedCampaign(campaignId);
  const client = await db();
  const trial = await client.trial.findFirst({ where: { id: trialId, campaignId }, include: { robot: true } });
  if (!trial) throw new DomainError('not_found', 'no such trial in this campaign', 'trialId');
  if (trial.status !== 'running') {
    throw new DomainError('conflict', `this trial is already ${trial.status}; correct a logged value with an amendment instead`, 'status', { trial: { id: trial.id, status: trial.status, version: trial.version } });
  }
  if (input.version !== undefined && input.version !== trial.version) {
    throw new DomainError('conflict', 'this trial was changed on another device; reload it and enter the readings again', 'version', { currentVersion: trial.version });
  }
  const responses = campaign.responses;
  const passed = input.status === 'failed' ? false : input.passed ?? (input.status === 'done' ? true : undefined);
  const finishedAt = input.finishedAt ?? now.toISOString();
  const check = checkTrialEntry(
    responses,
    input.observations,
    { passed, failureReason: input.failureReason, startedAt: trial.startedAt.toISOString(), finishedAt },
    { now: now.toISOString(), robotMassKg: trial.robot ? trial.robot.massGrams / 1000 : null, robotHeightM: trial.robot?.heightMm ? trial.robot.heightMm / 1000 : null },
  );
  if (check.errors.length) throw invalidInput(check.errors[0]!.field, check.errors[0]!.message, { errors: check.errors, warnings: check.warnings });
  const updated = await client.$transaction(async (tx) => {
    const res = await tx.trial.updateMany({
      where: { id: trial.id, version: trial.version, status: 'running' },
      data: {
        status: input.status,
        passed: passed ?? null,
        failureReason: input.failureReason,
        notes: input.notes,
        finishedAt: new Date(finishedAt),
        version: { increment: 1 },
      },
    });
    if (res.count !== 1) throw new DomainError('conflict', 'this trial was changed on another device at the same moment; reload it', 'version');
    for (const [name, value] of Object.entries(input.observations)) {
      const unit = observationField(responses, name)?.unit ?? '';
      await tx.observation.create({ data: { trialId: trial.id, name, value, unit, origin: 'typed' } });
    }
    await audit(tx, actor, 'finish-trial', 'trial', trial.id, { status: 'running', version: trial.version }, { status: input.status, passed, observations: input.observations });
    return tx.trial.findUniqueOrThrow({ where: { id: trial.id }, include: { observations: true } });
  });
  return { trial: updated, warnings: check.warnings };
}

export async function amendTrial(campaignId: string, trialId: string, input: AmendmentInput, actor = 'local') {
  const client = await db();
  const trial = await client.trial.findFirst({ where: { id: trialId, campaignId }, include: { observations: true } });
  if (!trial) throw new DomainError('not_found', 'no such trial in this campaign', 'trialId');
  return client.$transaction(async (tx) => {
    const obs = trial.observations.find((o) => o.name === input.field);
    let oldValue: string;
    if (obs) {
      if (typeof input.newValue !== 'number' || !Number.isFinite(input.newValue)) throw invalidInput('newValue', `${input.field} is a number; give the corrected number`);
      oldValue = String(obs.value);
      await tx.observation.update({ where: { id: obs.id }, data: { value: input.newValue } });
    } else if (input.field === 'notes' || input.field === 'failureReason') {
      oldValue = String(trial[input.field]);
      await tx.trial.update({ where: { id: trial.id }, data: { [input.field]: String(input.newValue), version: { increment: 1 } } });
    } else if (input.field === 'passed') {
      if (typeof input.newValue !== 'boolean') throw invalidInput('newValue', 'passed is true or false');
      oldValue = String(trial.passed);
      await tx.trial.update({ where: { id: trial.id }, data: { passed: input.newValue, version: { increment: 1 } } });
    } else {
      throw invalidInput('field', `"${input.field}" cannot be amended; amend a logged response, notes, failureReason or passed`);
    }
    const a = await tx.amendment.create({ data: { trialId: trial.id, field: input.field, oldValue, newValue: String(input.newValue), reason: input.reason, author: actor } });
    await audit(tx, actor, 'amend', 'trial', trial.id, { [input.field]: oldValue }, { [input.field]: input.newValue, reason: input.reason });
    return a;
  });
}

export async function trialsOf(campaignId: string) {
  const client = await db();
  return readAllPaged((skip, take) =>
    client.trial.findMany({
      where: { campaignId },
      orderBy: [{ startedAt: 'asc' }, { id: 'asc' }],
      skip,
      take,
      include: { observations: true, amendments: { orderBy: { createdAt: 'asc' } }, run: true, rig: true, robot: true },
    }),
  );
}
