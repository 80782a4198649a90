/**
 * Hostile input against the JSON API's POST routes, called as the server calls them (Request in,
 * Response out) on a real database: malformed JSON, wrong types, huge and non-finite numbers, long and
 * odd Unicode, injection strings (fast-check). Never a 5xx; every 4xx names its field in
 * { error: { code, message, field } }; what was stored before is intact afterwards.
 */
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { bearer, tokenFor } from '../support/auth';
import { freshDatabase } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

/** Paths (below src/app/api) of every route file under v1 that answers POST. */
function postRoutes(): string[] {
  const base = path.join('src', 'app', 'api');
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name === 'route.ts' && /export (const|async function) POST\b/.test(readFileSync(full, 'utf8'))) {
        out.push(path.relative(base, dir).split(path.sep).join('/'));
      }
    }
  };
  walk(path.join(base, 'v1'));
  return out.sort();
}

const nasty = fc.oneof(
  fc.constantFrom(
    "'; DROP TABLE \"Trial\"; --",
    '<script>alert(1)</script>',
    '{"$where": "1"}',
    '\u0000\u202e\ud83e\udd16',
    'Ω≈ç√∫˜µ≤≥÷',
    '../../etc/passwd',
    'x'.repeat(20_000),
  ),
  fc.string({ unit: 'binary', maxLength: 200 }),
);
const weirdNumber = fc.constantFrom(1e308, -1e308, 1e-320, -0, 2 ** 53 + 1, 123456789012345);
const leaf = fc.oneof(nasty, weirdNumber, fc.integer(), fc.double(), fc.boolean(), fc.constant(null));
const jsonValue = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: 'small' }, leaf, fc.array(tie('value'), { maxLength: 4 }), fc.dictionary(fc.oneof(nasty, fc.constantFrom('factors', 'name', 'kind', 'low', 'high', 'method', 'runs', 'response', 'terms', 'data', 'observations', 'values', 'startDate')), tie('value'), { maxKeys: 5 })),
})).value;
const body = fc.oneof(
  jsonValue.map((v) => JSON.stringify(v)),
  fc.constantFrom('{', '{"factors": [', 'NaN', '{"low": Infinity}', '', '[]', 'null', '{"name": "x", "factors": [{"name": "a", "kind": "continuous", "low": 1e999, "high": -1e999}]}'),
  nasty,
);

describe('hostile input on every POST route of /api/v1', () => {
  let campaignId = '';
  let runId = '';
  let trialCount = 0;
  const routes: [string, Handler, Record<string, string>][] = [];
  let auth: Record<string, string> = {};

  beforeAll(async () => {
    await freshDatabase();
    auth = bearer(await tokenFor('admin'));
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Fuzz target',
        factors: [
          { name: 'payload', kind: 'continuous', low: 0, high: 2 },
          { name: 'surface', kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true, changeMinutes: 40 },
        ],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench A' }],
      }),
    );
    campaignId = c.id;
    await commitDesign(campaignId, { method: 'full-factorial', seed: 1 });
    runId = (await listRuns(campaignId))[0]!.id;
    const p = { id: campaignId, trialId: 'nope', suggestionId: 'nope' };
    const load = async (route: string) => ((await import(/* @vite-ignore */ `../../src/app/api/${route}/route.ts`)) as { POST: Handler }).POST;
    // Every POST route under /api/v1, found on disk, so a route added later is fuzzed without a list to
    // keep. The two that the checks below address by position come first.
    const found = postRoutes();
    const first = ['v1/designs', 'v1/campaigns'];
    expect(found).toEqual(expect.arrayContaining([...first, 'v1/campaigns/[id]/trials/log', 'v1/campaigns/[id]/imports', 'v1/users', 'v1/tokens/revoke']));
    for (const route of [...first, ...found.filter((f) => !first.includes(f))]) {
      routes.push([route, await load(route), route.startsWith('v1/jobs/') ? { id: 'nope' } : p]);
    }
    const client = await db();
    trialCount = await client.trial.count();
  });
  afterAll(async () => {
    await closeDb();
  });

  it('answers every malformed body with a 4xx naming the field, never a 5xx', async () => {
    for (const [route, handler, params] of routes) {
      await fc.assert(
        fc.asyncProperty(body, async (text) => {
          const req = new Request(`http://localhost/api/${route}`, { method: 'POST', body: text, headers: { 'content-type': 'application/json', ...auth } });
          const res = await handler(req, { params: Promise.resolve(params) });
          expect(res.status, `${route} answered ${res.status} to ${text.slice(0, 120)}`).toBeLessThan(500);
          if (res.status >= 400) {
            const json = (await res.json()) as { error?: { code?: string; message?: string; field?: unknown } };
            expect(typeof json.error?.message, route).toBe('string');
            expect(json.error && 'field' in json.error, route).toBe(true);
          }
        }),
        { numRuns: 40, seed: 20261202 },
      );
    }
  }, 240_000);

  it('answers near-valid design and campaign specs with weird values with a 4xx or a result, never a 5xx', async () => {
    const num = fc.oneof(weirdNumber, fc.double({ noNaN: false }), fc.integer({ min: -5, max: 5 }));
    const factor = fc.oneof(
      fc.record({ name: fc.oneof(nasty, fc.constantFrom('a', 'b', 'payload')), kind: fc.constant('continuous'), low: num, high: num }),
      fc.record({ name: fc.constantFrom('c', 'd'), kind: fc.constant('discrete'), values: fc.array(num, { maxLength: 4 }) }),
      fc.record({ name: fc.constantFrom('s', 'surface'), kind: fc.constant('categorical'), levels: fc.array(nasty, { maxLength: 3 }) }),
    );
    const spec = fc.record({
      factors: fc.array(factor, { maxLength: 4 }),
      method: fc.constantFrom('full-factorial', 'central-composite', 'plackett-burman', 'latin-hypercube', 'sobol', 'box-behnken', 'nonsense'),
      runs: fc.option(fc.oneof(fc.integer({ min: -3, max: 40 }), weirdNumber), { nil: undefined }),
      seed: fc.option(fc.oneof(fc.integer(), weirdNumber), { nil: undefined }),
    });
    const [, designs] = routes[0]!;
    const [, campaigns] = routes[1]!;
    await fc.assert(
      fc.asyncProperty(spec, async (s) => {
        for (const [handler, payload] of [
          [designs, s],
          [campaigns, { name: 'fuzz', factors: s.factors, responses: [{ name: 'y', goal: 'maximize' }] }],
        ] as const) {
          const res = await handler(new Request('http://localhost/api', { method: 'POST', body: JSON.stringify(payload), headers: auth }), { params: Promise.resolve({}) });
          expect(res.status).toBeLessThan(500);
          if (res.status >= 400) {
            const json = (await res.json()) as { error?: { message?: string; field?: unknown } };
            expect(typeof json.error?.message).toBe('string');
          }
        }
      }),
      { numRuns: 120, seed: 7 },
    );
  }, 240_000);

  it('leaves what was stored intact', async () => {
    const client = await db();
    expect(await client.trial.count()).toBe(trialCount);
    const run = await client.run.findUnique({ where: { id: runId } });
    expect(run?.campaignId).toBe(campaignId);
    expect(await client.campaign.count({ where: { id: campaignId } })).toBe(1);
  });
});
