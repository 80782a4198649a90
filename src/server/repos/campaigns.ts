/** Campaign aggregate: the campaign with its factors, responses, robots and rigs. */
import { DomainError } from '@/domain/errors';
import type { Factor, ResponseDefinition } from '@/domain/factors';
import { validateFactors } from '@/domain/factors';
import type { CampaignCreate } from '@/server/api/schemas/campaign';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { toFactor, toResponse } from './mappers';

export interface CampaignView {
  id: string;
  name: string;
  objective: string;
  isDemo: boolean;
  trialMinutes: number;
  createdAt: string;
  factors: (Factor & { id: string; changeMinutes: number })[];
  responses: (ResponseDefinition & { id: string })[];
  robots: { id: string; name: string; serial: string; massGrams: number; heightMm: number | null }[];
  rigs: { id: string; name: string; timeZone: string; workdays: number[]; startTime: string; endTime: string }[];
}

export async function createCampaign(input: CampaignCreate, actor = 'local', options: { isDemo?: boolean } = {}): Promise<CampaignView> {
  // Domain-level checks beyond the schema (the same function the design engine trusts).
  validateFactors(
    input.factors.map((f) => ({ ...f, unit: f.unit || undefined }) as Factor),
    'factors',
  );
  const client = await db();
  const id = await client.$transaction(async (tx) => {
    const c = await tx.campaign.create({
      data: {
        name: input.name,
        objective: input.objective,
        trialMinutes: input.trialMinutes,
        isDemo: options.isDemo ?? false,
        factors: {
          create: input.factors.map((f, position) => ({
            position,
            name: f.name,
            kind: f.kind,
            unit: f.unit ?? '',
            low: f.kind === 'continuous' ? f.low : null,
            high: f.kind === 'continuous' ? f.high : null,
            valuesJson: JSON.stringify(f.kind === 'discrete' ? [...f.values].sort((a, b) => a - b) : f.kind === 'categorical' ? f.levels : []),
            hardToChange: f.hardToChange ?? false,
            changeMinutes: f.changeMinutes ?? 0,
          })),
        },
        responses: {
          create: input.responses.map((r, position) => ({
            position,
            name: r.name,
            unit: r.unit ?? '',
            goal: r.goal,
            target: r.target ?? null,
            lower: r.lower ?? null,
            upper: r.upper ?? null,
          })),
        },
        robots: { create: input.robots.map((r) => ({ name: r.name, serial: r.serial, massGrams: r.massGrams, heightMm: r.heightMm ?? null, notes: r.notes })) },
        rigs: {
          create: input.rigs.map((r) => ({
            name: r.name,
            timeZone: r.timeZone,
            workdays: JSON.stringify(r.workdays),
            startTime: r.startTime,
            endTime: r.endTime,
          })),
        },
      },
    });
    await audit(tx, actor, 'create', 'campaign', c.id, null, input);
    return c.id;
  });
  return getCampaign(id);
}

export async function listCampaigns() {
  const client = await db();
  const rows = await client.campaign.findMany({
    orderBy: { createdAt: 'desc' },
    include: { _count: { select: { runs: true, trials: true, factors: true } } },
  });
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    objective: r.objective,
    isDemo: r.isDemo,
    createdAt: r.createdAt.toISOString(),
    runs: r._count.runs,
    trials: r._count.trials,
    factors: r._count.factors,
  }));
}

export async function getCampaign(id: string): Promise<CampaignView> {
  const client = await db();
  const c = await client.campaign.findUnique({
    where: { id },
    include: {
      factors: { orderBy: { position: 'asc' } },
      responses: { orderBy: { position: 'asc' } },
      robots: { orderBy: { name: 'asc' } },
      rigs: { orderBy: { name: 'asc' } },
    },
  });
  if (!c) throw new DomainError('not_found', `no campaign with id "${id}"; pick one from the campaign list`, 'id');
  return {
    id: c.id,
    name: c.name,
    objective: c.objective,
    isDemo: c.isDemo,
    trialMinutes: c.trialMinutes,
    createdAt: c.createdAt.toISOString(),
    factors: c.factors.map((f) => ({ ...toFactor(f), id: f.id, changeMinutes: f.changeMinutes })),
    responses: c.responses.map((r) => ({ ...toResponse(r), id: r.id })),
    robots: c.robots.map((r) => ({ id: r.id, name: r.name, serial: r.serial, massGrams: r.massGrams, heightMm: r.heightMm })),
    rigs: c.rigs.map((r) => ({
      id: r.id,
      name: r.name,
      timeZone: r.timeZone,
      workdays: JSON.parse(r.workdays) as number[],
      startTime: r.startTime,
      endTime: r.endTime,
    })),
  };
}

/**
 * Campaign definitions (factors, responses, robots, rigs) for hot paths such as the rig log, kept in
 * memory per database client. A change to a campaign's definition must call `forgetCampaign(id)` in
 * the process that makes it; entries are also re-read after CAMPAIGN_CACHE_MS, which bounds how long
 * another app server sharing a PostgreSQL database could see an old definition.
 */
export const CAMPAIGN_CACHE_MS = 10_000;
const cacheHolder = globalThis as unknown as { saltusCampaignCache?: { client: unknown; entries: Map<string, { view: Promise<CampaignView>; at: number }> } };

export async function cachedCampaign(id: string): Promise<CampaignView> {
  const client = await db();
  if (cacheHolder.saltusCampaignCache?.client !== client) cacheHolder.saltusCampaignCache = { client, entries: new Map() };
  const entries = cacheHolder.saltusCampaignCache.entries;
  const now = Date.now();
  const hit = entries.get(id);
  if (hit && now - hit.at < CAMPAIGN_CACHE_MS) return hit.view;
  const view = getCampaign(id);
  entries.set(id, { view, at: now });
  // An unknown campaign is not remembered (it may be created in a moment).
  view.catch(() => {
    if (entries.get(id)?.view === view) entries.delete(id);
  });
  return view;
}

/** Drop a campaign's cached definition; call after any change to its factors, responses, robots or rigs. */
export function forgetCampaign(id: string): void {
  cacheHolder.saltusCampaignCache?.entries.delete(id);
}

/** Domain factors of a campaign (without database ids), in position order. */
export function domainFactors(c: CampaignView): Factor[] {
  return c.factors.map((f) => {
    const { id: _id, changeMinutes: _cm, ...rest } = f;
    void _id;
    void _cm;
    return rest as Factor;
  });
}
