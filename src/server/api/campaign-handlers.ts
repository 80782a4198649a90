/** Route handlers for the campaign loop: parse with the shared schema, call the repository, answer. */
import { DomainError } from '@/domain/errors';
import {
  amendmentSchema,
  campaignAnalysisSchema,
  campaignCreateSchema,
  campaignDesignSchema,
  nextTrialSchema,
  runCreateSchema,
  scheduleCreateSchema,
  suggestionBatchSchema,
  trialFinishSchema,
  trialStartSchema,
} from '@/server/api/schemas/campaign';
import { fitCampaign } from '@/server/repos/analyses';
import { createCampaign, getCampaign, listCampaigns } from '@/server/repos/campaigns';
import { addRun, commitDesign, commitJobDesign, listRuns, previewDesign } from '@/server/repos/runs';
import { listSlots, placeRuns } from '@/server/repos/schedule';
import { acceptSuggestion, proposeNextTrial, proposeSurrogateBatch } from '@/server/repos/suggestions';
import { amendTrial, finishTrial, startTrial, trialsOf } from '@/server/repos/trials';
import { IDEMPOTENCY_KEY, jsonResponse, readJson, type Caller } from './http';
import { jobIdSchema } from './jobs';
import { parseWith } from './validation';

export const listCampaignsHandler = async () => ({ campaigns: await listCampaigns() });

export const createCampaignHandler = async (req: Request, _p: Record<string, string>, c: Caller) => {
  const input = parseWith(campaignCreateSchema, await readJson(req));
  return jsonResponse(await createCampaign(input, c.actor), 201);
};

export const getCampaignHandler = async (_req: Request, p: Record<string, string>) => getCampaign(p.id!);

export const designHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const fromJob = new URL(req.url).searchParams.get('fromJob');
  if (fromJob !== null) return jsonResponse(await commitJobDesign(p.id!, parseWith(jobIdSchema, fromJob, 'fromJob'), c.actor), 201);
  const input = parseWith(campaignDesignSchema, await readJson(req));
  if (new URL(req.url).searchParams.get('preview') === '1') return previewDesign(p.id!, input);
  return jsonResponse(await commitDesign(p.id!, input, c.actor), 201);
};

export const listRunsHandler = async (_req: Request, p: Record<string, string>) => ({ runs: await listRuns(p.id!) });

export const addRunHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(runCreateSchema, await readJson(req));
  return jsonResponse(await addRun(p.id!, input.values, input.source, c.actor, input.reason), 201);
};

export const scheduleHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(scheduleCreateSchema, await readJson(req));
  return placeRuns(p.id!, input.startDate, input.days, c.actor);
};

export const listSlotsHandler = async (req: Request, p: Record<string, string>) => ({
  slots: await listSlots(p.id!, new URL(req.url).searchParams.get('rig') ?? undefined),
});

export const listTrialsHandler = async (_req: Request, p: Record<string, string>) => ({ trials: await trialsOf(p.id!) });

export const startTrialHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const key = req.headers.get('idempotency-key');
  if (key !== null && !IDEMPOTENCY_KEY.test(key)) {
    throw new DomainError('invalid_input', 'Idempotency-Key must be 8–100 letters, digits or . _ : -', 'Idempotency-Key');
  }
  const input = parseWith(trialStartSchema, await readJson(req));
  const { trial, replayed } = await startTrial(p.id!, input, key, c.actor);
  return jsonResponse({ trial, replayed }, replayed ? 200 : 201);
};

export const finishTrialHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(trialFinishSchema, await readJson(req));
  return finishTrial(p.id!, p.trialId!, input, c.actor);
};

export const amendTrialHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(amendmentSchema, await readJson(req));
  return jsonResponse(await amendTrial(p.id!, p.trialId!, input, c.actor), 201);
};

export const analysisHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(campaignAnalysisSchema, await readJson(req));
  return fitCampaign(p.id!, input.response, input.model, input.terms, c.actor);
};

export const nextTrialHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(nextTrialSchema, await readJson(req));
  return proposeNextTrial(p.id!, input.model, input.seed, c.actor);
};

export const acceptSuggestionHandler = async (_req: Request, p: Record<string, string>, c: Caller) => {
  const result = await acceptSuggestion(p.id!, p.suggestionId!, c.actor);
  return jsonResponse(result, result.replayed ? 200 : 201);
};

export const suggestionBatchHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(suggestionBatchSchema, await readJson(req));
  return proposeSurrogateBatch(p.id!, input, c.actor);
};
