/**
 * Hostile input against the rig page's POST routes (combined log entry, trial tracks, import of past
 * trials), called as the server calls them: never a 5xx, every 4xx names a field, nothing stored.
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { bearer, tokenFor } from '../support/auth';
import { freshDatabase } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

const nasty = fc.oneof(
  fc.constantFrom("'; DROP TABLE \"Trial\"; --", '<script>alert(1)</script>', '\u0000\u202e', 'x'.repeat(20_000), '../../etc/passwd'),
  fc.string({ unit: 'binary', maxLength: 120 }),
);
const weirdNumber = fc.constantFrom(1e308, -1e308, 1e-320, -0, 2 ** 53 + 1);
const leaf = fc.oneof(nasty, weirdNumber, fc.integer(), fc.double(), fc.boolean(), fc.constant(null));
const keys = fc.oneof(nasty, fc.constantFrom('runId', 'observations', 'apex_height', 'startedAt', 'finishedAt', 'status', 'passed', 'csv', 'mapping', 'units', 'acceptValidRowsOnly', 'dryRun', 'repeat'));
const jsonValue = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: 'small' }, leaf, fc.array(tie('value'), { maxLength: 4 }), fc.dictionary(keys, tie('value'), { maxKeys: 6 })),
})).value;
const body = fc.oneof(jsonValue.map((v) => JSON.stringify(v)), fc.constantFrom('{', '', 'null', '[]', 'time,x,y,z\n1,2,3', 'NaN'), nasty);
const query = fc.oneof(
  fc.constant(''),
  fc.constant('?time=t&x=x&y=y&z=z&lengthUnit=mm&timeUnit=ms'),
  fc.constant('?format=mcap&topic=/robot/pose'),
  fc.constant('?time=t&x=x&y=y&z=z&lengthUnit=km&timeUnit=ms&massGrams=-1'),
  fc.constant('?format=mcap&topic=&targetX=abc'),
);

describe('hostile input on the rig routes', () => {
  let campaignId = '';
  let trialId = '';
  let auth: Record<string, string> = {};
  let counts = { trials: 0, runs: 0, tracks: 0, observations: 0 };
  let routes: [string, Handler][] = [];

  async function snapshot() {
    const client = await db();
    return { trials: await client.trial.count(), runs: await client.run.count(), tracks: await client.track.count(), observations: await client.observation.count() };
  }

  beforeAll(async () => {
    await freshDatabase();
    auth = bearer(await tokenFor('planner'));
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Rig fuzz target',
        factors: [{ name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 2 }],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench A' }],
      }),
    );
    campaignId = c.id;
    await commitDesign(campaignId, { method: 'full-factorial', seed: 1 });
    const run = (await listRuns(campaignId))[0]!;
    const client = await db();
    trialId = (await client.trial.create({ data: { campaignId, runId: run.id, status: 'done', startedAt: new Date('2026-03-02T10:00:00Z') } })).id;
    const load = async (path: string) => ((await import(/* @vite-ignore */ `../../src/app/api/${path}/route.ts`)) as { POST: Handler }).POST;
    routes = [
      ['v1/campaigns/[id]/trials/log', await load('v1/campaigns/[id]/trials/log')],
      ['v1/campaigns/[id]/trials/[trialId]/tracks', await load('v1/campaigns/[id]/trials/[trialId]/tracks')],
      ['v1/campaigns/[id]/imports', await load('v1/campaigns/[id]/imports')],
    ];
    counts = await snapshot();
  });
  afterAll(async () => {
    await closeDb();
  });

  it('answers every malformed request with a 4xx naming the field, never a 5xx', async () => {
    for (const [path, handler] of routes) {
      await fc.assert(
        fc.asyncProperty(body, query, fc.constantFrom(null, 'fuzz-key-0001', 'short', 'bad key with spaces'), async (text, q, key) => {
          const headers: Record<string, string> = { 'content-type': 'application/json', ...auth };
          if (key) headers['idempotency-key'] = key;
          const req = new Request(`http://localhost/api/${path}${q}`, { method: 'POST', body: text, headers });
          const res = await handler(req, { params: Promise.resolve({ id: campaignId, trialId }) });
          expect(res.status, `${path}${q} answered ${res.status} to ${text.slice(0, 120)}`).toBeLessThan(500);
          if (res.status >= 400) {
            const json = (await res.json()) as { error?: { message?: string; field?: unknown } };
            expect(typeof json.error?.message, path).toBe('string');
            expect(json.error && 'field' in json.error, path).toBe(true);
          }
        }),
        { numRuns: 40, seed: 20261202 },
      );
    }
  }, 240_000);

  it('stored nothing from any of it', async () => {
    expect(await snapshot()).toEqual(counts);
  });
});
