/**
 * Block generators on the campaign design route, on a real database: a design committed with named
 * block generators stores runs in the blocks their sign patterns give and keeps the generators in
 * the stored spec; a refused request names blockGenerators and leaves the stored design and runs intact.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { listRuns } from '@/server/repos/runs';
import { bearer, tokenFor } from '../support/auth';
import { freshDatabase } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

describe('campaign design route with block generators', () => {
  let campaignId = '';
  let POST: Handler;
  let auth: Record<string, string> = {};

  beforeAll(async () => {
    await freshDatabase();
    auth = bearer(await tokenFor('admin'));
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Blocked hop test',
        factors: [
          { name: 'payload', kind: 'continuous', low: 0, high: 2 },
          { name: 'gain', kind: 'continuous', low: 10, high: 30 },
          { name: 'stiffness', kind: 'continuous', low: 1, high: 3 },
          { name: 'crouch', kind: 'continuous', low: 0.2, high: 0.8 },
          { name: 'surface', kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true, changeMinutes: 40 },
        ],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench A' }],
      }),
    );
    campaignId = c.id;
    const routePath = 'v1/campaigns/[id]/designs';
    POST = ((await import(/* @vite-ignore */ `../../src/app/api/${routePath}/route.ts`)) as { POST: Handler }).POST;
  });
  afterAll(closeDb);

  const send = (body: unknown, query = '') =>
    POST(new Request(`http://localhost/api/v1/campaigns/${campaignId}/designs${query}`, { method: 'POST', headers: { 'content-type': 'application/json', ...auth }, body: JSON.stringify(body) }), {
      params: Promise.resolve({ id: campaignId }),
    });

  it('commits the design: runs in the sign-pattern blocks, generators in the diagnostics and the stored spec', async () => {
    const res = await send({ method: 'fractional-factorial', model: 'main-effects', resolution: 5, blockGenerators: ['ABC', 'ACD'], seed: 2 });
    expect(res.status).toBe(201);
    const body = (await res.json()) as { runs: number; diagnostics: { blocking: { blocks: number; generators: string[] } } };
    expect(body.runs).toBe(16);
    expect(body.diagnostics.blocking.blocks).toBe(4);
    expect(body.diagnostics.blocking.generators).toEqual(['payload*gain*stiffness', 'payload*stiffness*crouch']);
    const runs = await listRuns(campaignId);
    expect(runs).toHaveLength(16);
    const client = await db();
    const stored = await client.run.findMany({ where: { campaignId } });
    for (const r of stored) {
      const c = JSON.parse(r.codedJson) as number[];
      const abc = c[0]! * c[1]! * c[2]!;
      const acd = c[0]! * c[2]! * c[3]!;
      expect(r.block).toBe(1 + (abc < 0 ? 1 : 0) + (acd < 0 ? 2 : 0));
    }
    const design = await client.design.findFirst({ where: { campaignId }, orderBy: { version: 'desc' } });
    expect((JSON.parse(design!.specJson) as { blockGenerators: string[] }).blockGenerators).toEqual(['ABC', 'ACD']);
  });

  it('refuses bad generators naming blockGenerators, and the committed design and runs stay', async () => {
    const client = await db();
    const before = await client.run.findMany({ where: { campaignId }, orderBy: { runNumber: 'asc' } });
    const cases: [unknown, string][] = [
      [{ method: 'fractional-factorial', model: 'main-effects', resolution: 5, blockGenerators: ['ABQ'] }, 'blockGenerators[0]'],
      // In this 2^(5−1) with E = ABCD, CDE is AB and ABC·CDE is the main effect of stiffness (C).
      [{ method: 'fractional-factorial', model: 'main-effects', resolution: 5, blockGenerators: ['ABC', 'CDE'] }, 'blockGenerators'],
      [{ method: 'fractional-factorial', model: 'main-effects', resolution: 5, blockGenerators: ['ABC', 'ACD'], blocks: 8 }, 'blockGenerators'],
      [{ method: 'central-composite', blockGenerators: ['ABC'] }, 'blockGenerators'],
      [{ method: 'full-factorial', blockGenerators: 'ABC' }, 'blockGenerators'],
    ];
    for (const [body, field] of cases) {
      const res = await send(body);
      expect(res.status).toBe(400);
      expect(((await res.json()) as { error: { field: string } }).error.field).toBe(field);
    }
    const after = await client.run.findMany({ where: { campaignId }, orderBy: { runNumber: 'asc' } });
    expect(after).toEqual(before);
    expect(await client.design.count({ where: { campaignId } })).toBe(1);
  });

  it('previews without storing', async () => {
    const res = await send({ method: 'full-factorial', model: 'main-effects', blockGenerators: ['ABCDE'] }, '?preview=1');
    expect(res.status).toBe(200);
    const body = (await res.json()) as { runs: { block: number }[]; diagnostics: { blocking: { generators: string[] } } };
    expect(body.runs).toHaveLength(32);
    expect(body.diagnostics.blocking.generators).toEqual(['payload*gain*stiffness*crouch*surface']);
    expect(await (await db()).design.count({ where: { campaignId } })).toBe(1);
  });
});
