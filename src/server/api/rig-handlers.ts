/**
 * Route handlers of the rig page: the combined idempotent log entry, one trial, a trial's motion
 * track, and the import of past trials. Parse, call the repository, answer.
 */
import { z } from 'zod';
import { DomainError } from '@/domain/errors';
import { trialImportSchema, trialLogSchema } from '@/server/api/schemas/rig';
import { importTrials } from '@/server/repos/imports';
import { getTrial, logTrial } from '@/server/repos/rig-log';
import { storeMcapTrack, storeTrack, type TrackUpload } from '@/server/repos/tracks';
import { IDEMPOTENCY_KEY, jsonResponse, readJson, readText, type Caller } from './http';
import { optionalQueryNumber, trackQuerySchema } from './tracks';
import { parseWith } from './validation';

/** Largest track stored with a trial, bytes. */
export const MAX_TRIAL_TRACK_BYTES = 16 * 1024 * 1024;
/** Largest past-trials import, bytes of JSON. */
export const MAX_IMPORT_BYTES = 8 * 1024 * 1024;

export const logTrialHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const key = req.headers.get('idempotency-key');
  if (key === null || !IDEMPOTENCY_KEY.test(key)) {
    throw new DomainError('invalid_input', 'send an Idempotency-Key header of 8–100 letters, digits or . _ : - (one per log entry)', 'Idempotency-Key');
  }
  const input = parseWith(trialLogSchema, await readJson(req));
  const result = await logTrial(p.id!, input, key, c.actor);
  return jsonResponse(result, result.replayed ? 200 : 201);
};

export const getTrialHandler = async (_req: Request, p: Record<string, string>) => ({ trial: await getTrial(p.id!, p.trialId!) });

const mcapQuerySchema = z.object({
  topic: z.string().trim().min(1, 'name the topic that carries the robot pose, e.g. /robot/pose'),
  massGrams: optionalQueryNumber.refine((v) => v === undefined || v > 0, 'the mass must be > 0 g'),
  energyJoules: optionalQueryNumber.refine((v) => v === undefined || v >= 0, 'the energy must be ≥ 0 J'),
  targetX: optionalQueryNumber,
  targetY: optionalQueryNumber,
  fileName: z.string().max(200).optional(),
});

async function readBytes(req: Request, maxBytes: number): Promise<Uint8Array> {
  const declared = Number(req.headers.get('content-length') ?? '0');
  const tooLarge = () => new DomainError('invalid_input', `the file is larger than ${Math.round(maxBytes / 1024 / 1024)} MiB; send a shorter log`, '(body)');
  if (declared > maxBytes) throw tooLarge();
  const bytes = new Uint8Array(await req.arrayBuffer());
  if (bytes.length > maxBytes) throw tooLarge();
  return bytes;
}

export const storeTrackHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const params = new URL(req.url).searchParams;
  if (params.get('format') === 'mcap') {
    const raw: Record<string, string> = {};
    for (const [k, v] of params) if (k !== 'format') raw[k] = v;
    const q = parseWith(mcapQuerySchema, raw);
    const bytes = await readBytes(req, MAX_TRIAL_TRACK_BYTES);
    return jsonResponse(await storeMcapTrack(p.id!, p.trialId!, bytes, q, c.actor), 201);
  }
  const csv = await readText(req, MAX_TRIAL_TRACK_BYTES);
  const raw: Record<string, string> = {};
  for (const [k, v] of params) if (k !== 'fileName') raw[k] = v;
  const q = parseWith(trackQuerySchema, raw);
  const upload = Object.fromEntries(Object.entries(q).filter(([, v]) => v !== undefined)) as unknown as TrackUpload;
  upload.fileName = (params.get('fileName') ?? '').slice(0, 200);
  return jsonResponse(await storeTrack(p.id!, p.trialId!, csv, upload, c.actor), 201);
};

export const importTrialsHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(trialImportSchema, await readJson(req, MAX_IMPORT_BYTES));
  const result = await importTrials(p.id!, input, c.actor);
  return jsonResponse(result, input.dryRun ? 200 : 201);
};
