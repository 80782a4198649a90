/**
 * /api/v1/jobs: long computations (an optimal-design search, a surrogate batch) as jobs. POST answers
 * 202 with the job's id at once; GET reads its status, progress and, when done, its result; cancel asks
 * it to stop (a design search keeps its best design so far).
 */
import { z } from 'zod';
import { startedJobRunner } from '@/server/jobs';
import { JOB_KINDS, prepareJob } from '@/server/jobs/kinds';
import { getJob, listJobs, requestCancel, type JobView } from '@/server/repos/jobs';
import { jsonResponse, readJson, type Caller } from './http';
import { parseWith } from './validation';

export const jobIdSchema = z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, 'an id has only letters, digits, _ and - (at most 64)');
const id = jobIdSchema;

export const jobCreateSchema = z.object({
  kind: z.enum(JOB_KINDS, { error: `kind must be one of: ${JOB_KINDS.join(', ')}` }),
  /** The body the synchronous route takes (POST /api/v1/designs or /suggestions), or, with campaignId, the campaign route's body. */
  input: z.unknown().refine((v) => v !== undefined && v !== null && typeof v === 'object' && !Array.isArray(v), 'input must be a JSON object'),
  campaignId: id.optional(),
});

/** The public shape of a job (no input, no internal fields). */
export function publicJob(j: JobView) {
  const out: Record<string, unknown> = { id: j.id, kind: j.kind, status: j.status, progress: j.progress, message: j.message };
  if (j.campaignId) out.campaignId = j.campaignId;
  if (j.cancelRequested && j.status === 'running') out.cancelRequested = true;
  if (j.result !== undefined) out.result = j.result;
  if (j.error !== undefined) out.error = j.error;
  out.createdAt = j.createdAt;
  if (j.startedAt) out.startedAt = j.startedAt;
  if (j.finishedAt) out.finishedAt = j.finishedAt;
  return out;
}

export const createJobHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const body = parseWith(jobCreateSchema, await readJson(req));
  const envelope = await prepareJob(body.kind, body.input, body.campaignId);
  const runner = await startedJobRunner();
  const job = await runner.submit(body.kind, envelope, { campaignId: body.campaignId, createdBy: c.actor });
  return jsonResponse({ id: job.id, status: job.status }, 202, { location: `/api/v1/jobs/${job.id}` });
};

export const getJobHandler = async (_req: Request, p: Record<string, string>) => publicJob(await getJob(parseWith(id, p.id, 'id')));

export const listJobsHandler = async (req: Request) => {
  const q = new URL(req.url).searchParams;
  const campaignId = q.get('campaignId') ?? undefined;
  const kind = q.get('kind') ?? undefined;
  const filter = parseWith(z.object({ campaignId: id.optional(), kind: z.enum(JOB_KINDS, { error: `kind must be one of: ${JOB_KINDS.join(', ')}` }).optional() }), { campaignId, kind });
  return { jobs: (await listJobs(filter)).map(publicJob) };
};

export const cancelJobHandler = async (_req: Request, p: Record<string, string>, c: Caller) => {
  // The row's flag is set here, in the route's own modules (its refusals map to 4xx here); the runner
  // is then told so a job running on this server stops without waiting for its next poll.
  const view = await requestCancel(parseWith(id, p.id, 'id'), c.actor);
  (await startedJobRunner()).interrupt(view.id);
  return publicJob(view);
};
