/**
 * Shared set-up of the rig-side integration tests: an invented campaign (payload in g and a discrete
 * controller gain, one robot of 1 g and 45 mm, one rig) with the responses a test asks for, its
 * full-factorial design committed, and the rejection helper the refusals are read with.
 */
import { DomainError } from '@/domain/errors';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';

/** The DomainError a promise is refused with (fails the test when it resolves or throws anything else). */
export async function rejection(p: Promise<unknown>): Promise<DomainError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof DomainError) return e;
    throw e;
  }
  throw new Error('expected a DomainError');
}

export interface RigCampaign {
  campaignId: string;
  robotId: string;
  rigId: string;
  runIds: string[];
}

/** Creates the campaign (by 'tester') and commits its main-effects full factorial with `seed`. */
export async function rigCampaign(options: {
  name: string;
  responses: { name: string; unit?: string; goal: string }[];
  robot: string;
  rig: Record<string, string>;
  seed: number;
}): Promise<RigCampaign> {
  const input = campaignCreateSchema.parse({
    name: options.name,
    factors: [
      { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
      { name: 'gain', kind: 'discrete', values: [0.5, 1, 2] },
    ],
    responses: options.responses,
    robots: [{ name: options.robot, massGrams: 1, heightMm: 45 }],
    rigs: [options.rig],
  });
  const c = await createCampaign(input, 'tester');
  await commitDesign(c.id, { method: 'full-factorial', model: 'main-effects', seed: options.seed }, 'tester');
  return { campaignId: c.id, robotId: c.robots[0]!.id, rigId: c.rigs[0]!.id, runIds: (await listRuns(c.id)).map((r) => r.id) };
}
