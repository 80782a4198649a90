/**
 * Job records: one row per long computation (a design search, a surrogate batch). The row is the status
 * every app server reads — queued → running → done | failed | cancelled — with progress, a message, the
 * input, and the result or the error. A cancel request is a flag in the row, so it reaches the worker
 * on whichever server runs the job.
 */
import { DomainError } from '@/domain/errors';
import type { Job as JobRow } from '@/generated/sqlite/client';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { parseJson } from './mappers';

export type JobStatus = 'queued' | 'running' | 'done' | 'failed' | 'cancelled';
export const FINISHED: readonly JobStatus[] = ['done', 'failed', 'cancelled'];

export interface JobError {
  code: string;
  message: string;
  field: string | null;
}

export interface JobView {
  id: string;
  kind: string;
  status: JobStatus;
  progress: number;
  message: string;
  campaignId?: string;
  result?: unknown;
  error?: JobError;
  cancelRequested: boolean;
  createdAt: string;
  startedAt?: string;
  finishedAt?: string;
}

export function toJobView(row: JobRow): JobView {
  const view: JobView = {
    id: row.id,
    kind: row.kind,
    status: row.status as JobStatus,
    progress: row.progress,
    message: row.message,
    cancelRequested: row.cancelRequested,
    createdAt: row.createdAt.toISOString(),
  };
  if (row.campaignId) view.campaignId = row.campaignId;
  if (row.resultJson) view.result = parseJson<unknown>(row.resultJson, null);
  if (row.errorJson) view.error = parseJson<JobError>(row.errorJson, { code: 'internal', message: 'the job failed', field: null });
  if (row.startedAt) view.startedAt = row.startedAt.toISOString();
  if (row.finishedAt) view.finishedAt = row.finishedAt.toISOString();
  return view;
}

export interface NewJob {
  kind: string;
  input: unknown;
  campaignId?: string;
  createdBy?: string;
}

export async function createJob(job: NewJob): Promise<JobRow> {
  const client = await db();
  return client.$transaction(async (tx) => {
    const row = await tx.job.create({
      data: { kind: job.kind, inputJson: JSON.stringify(job.input), campaignId: job.campaignId ?? null, createdBy: job.createdBy ?? 'local' },
    });
    await audit(tx, job.createdBy ?? 'local', 'submit', 'job', row.id, null, { kind: job.kind, campaignId: job.campaignId ?? null });
    return row;
  });
}

export async function findJob(id: string): Promise<JobRow | null> {
  const client = await db();
  return client.job.findUnique({ where: { id } });
}

export async function getJob(id: string): Promise<JobView> {
  const row = await findJob(id);
  if (!row) throw new DomainError('not_found', 'no job with this id; it may have been removed', 'id');
  return toJobView(row);
}

/** Recent jobs, newest first (of one campaign, or of one kind, when given). */
export async function listJobs(filter: { campaignId?: string; kind?: string; take?: number } = {}): Promise<JobView[]> {
  const client = await db();
  const rows = await client.job.findMany({
    where: { ...(filter.campaignId ? { campaignId: filter.campaignId } : {}), ...(filter.kind ? { kind: filter.kind } : {}) },
    orderBy: { createdAt: 'desc' },
    take: filter.take ?? 20,
  });
  return rows.map(toJobView);
}

/** queued → running for this worker; false when another worker took it or it was cancelled first. */
export async function claimJob(id: string, worker: string, now = new Date()): Promise<boolean> {
  const client = await db();
  const { count } = await client.job.updateMany({ where: { id, status: 'queued' }, data: { status: 'running', worker, startedAt: now, progress: 0 } });
  return count === 1;
}

/** A job taken again after its worker vanished (the queue's expiry): running again on a new worker. */
export async function reclaimJob(id: string, worker: string, now = new Date()): Promise<boolean> {
  const client = await db();
  const { count } = await client.job.updateMany({
    where: { id, status: 'running', NOT: { worker } },
    data: { worker, startedAt: now, progress: 0, message: 'started again on another server' },
  });
  return count === 1;
}

export async function reportProgress(id: string, progress: number, message: string): Promise<void> {
  const client = await db();
  await client.job.updateMany({ where: { id, status: 'running' }, data: { progress: Math.max(0, Math.min(1, progress)), message: message.slice(0, 500) } });
}

export async function isCancelRequested(id: string): Promise<boolean> {
  const client = await db();
  const row = await client.job.findUnique({ where: { id }, select: { cancelRequested: true } });
  return row?.cancelRequested ?? true;
}

export interface JobEnd {
  status: 'done' | 'failed' | 'cancelled';
  result?: unknown;
  error?: JobError;
  message?: string;
}

/** running → done | failed | cancelled, with the result or the error; only the worker that runs it may. */
export async function finishJob(id: string, worker: string, end: JobEnd, now = new Date()): Promise<boolean> {
  const client = await db();
  const { count } = await client.job.updateMany({
    where: { id, status: 'running', worker },
    data: {
      status: end.status,
      progress: end.status === 'done' ? 1 : undefined,
      message: end.message?.slice(0, 500),
      resultJson: end.result === undefined ? undefined : JSON.stringify(end.result),
      errorJson: end.error === undefined ? undefined : JSON.stringify(end.error),
      finishedAt: now,
    },
  });
  return count === 1;
}

/**
 * Ask a job to stop. A queued job is cancelled at once; a running one gets the flag its worker polls
 * (a design search then ends with its best design so far). A finished job answers 409.
 */
export async function requestCancel(id: string, actor = 'local', now = new Date()): Promise<JobView> {
  const client = await db();
  const row = await client.$transaction(async (tx) => {
    const before = await tx.job.findUnique({ where: { id } });
    if (!before) throw new DomainError('not_found', 'no job with this id; it may have been removed', 'id');
    if (FINISHED.includes(before.status as JobStatus)) {
      throw new DomainError('conflict', `the job has already ended (${before.status}); there is nothing to cancel`, 'id');
    }
    await tx.job.updateMany({ where: { id, status: 'queued' }, data: { status: 'cancelled', cancelRequested: true, message: 'cancelled before it started', finishedAt: now } });
    await tx.job.updateMany({ where: { id, status: 'running' }, data: { cancelRequested: true } });
    await audit(tx, actor, 'cancel', 'job', id, { status: before.status }, { cancelRequested: true });
    return tx.job.findUniqueOrThrow({ where: { id } });
  });
  return toJobView(row);
}

/**
 * Jobs left running by a server that stopped: marked failed with a message saying so. `worker` limits
 * this to one server's jobs (PostgreSQL, several servers); without it every running job is taken (SQLite,
 * one server).
 */
export async function failOrphanedJobs(worker?: string, now = new Date()): Promise<number> {
  const client = await db();
  const error: JobError = { code: 'interrupted', message: 'the server stopped while this job ran; start it again', field: null };
  const { count } = await client.job.updateMany({
    where: { status: 'running', ...(worker ? { worker } : {}) },
    data: { status: 'failed', errorJson: JSON.stringify(error), message: error.message, finishedAt: now },
  });
  return count;
}

/** Ids of queued jobs, oldest first. */
export async function queuedJobIds(): Promise<string[]> {
  const client = await db();
  const rows = await client.job.findMany({ where: { status: 'queued' }, orderBy: { createdAt: 'asc' }, select: { id: true } });
  return rows.map((r) => r.id);
}
