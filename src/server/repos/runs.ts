/** Designs and runs: committing a design to a campaign, listing runs with their state, adding runs. */
import { DomainError, invalidInput } from '@/domain/errors';
import type { DesignResult, DesignSpec } from '@/domain/design';
import { codePoint, isFeasible, type Point } from '@/domain/factors';
import type { z } from 'zod';
import type { campaignDesignSchema } from '@/server/api/schemas/campaign';
import { designOffThread } from '@/server/jobs/off-thread';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { domainFactors, getCampaign } from './campaigns';
import { parseJson, toRunView, type RunView } from './mappers';
import { readAllPaged } from './paged';

export type CampaignDesignInput = z.output<typeof campaignDesignSchema>;

/** Build the design spec a campaign's settings imply (face-centred axial runs for a CCD on a bounded rig). */
export function campaignDesignSpec(factors: DesignSpec['factors'], input: CampaignDesignInput): DesignSpec {
  return {
    factors,
    method: input.method,
    model: input.model,
    centerPoints: input.centerPoints,
    replicates: input.replicates,
    runs: input.runs,
    alpha: input.alpha ?? (input.method === 'central-composite' ? 'face-centred' : undefined),
    seed: input.seed ?? 1,
    ...(input.criterion !== undefined ? { criterion: input.criterion } : {}),
    ...(input.resolution !== undefined ? { resolution: input.resolution } : {}),
    ...(input.wholePlots !== undefined ? { wholePlots: input.wholePlots } : {}),
    ...(input.blocks !== undefined ? { blocks: input.blocks } : {}),
    ...(input.blockGenerators?.length ? { blockGenerators: input.blockGenerators } : {}),
    ...(input.blockEffects !== undefined ? { blockEffects: input.blockEffects } : {}),
    ...(input.varianceRatio !== undefined ? { varianceRatio: input.varianceRatio } : {}),
    ...(input.starts !== undefined ? { starts: input.starts } : {}),
  };
}

/** Preview a design without storing it. */
export async function previewDesign(campaignId: string, input: CampaignDesignInput): Promise<DesignResult> {
  const campaign = await getCampaign(campaignId);
  return designOffThread(campaignDesignSpec(domainFactors(campaign), input));
}

/**
 * Generate a design and commit it to the campaign as a new design version. Planned runs of earlier
 * designs that were never tried are withdrawn (the audit keeps them); tried runs always stay.
 */
export async function commitDesign(campaignId: string, input: CampaignDesignInput, actor = 'local') {
  const campaign = await getCampaign(campaignId);
  const spec = campaignDesignSpec(domainFactors(campaign), input);
  const result = await designOffThread(spec);
  return storeDesign(campaignId, spec, result, actor);
}

/**
 * Commit the design a finished design-search job of this campaign found (done, or cancelled with its
 * best design so far), as it was found: the search is not run again.
 */
export async function commitJobDesign(campaignId: string, jobId: string, actor = 'local') {
  const campaign = await getCampaign(campaignId);
  const client = await db();
  const job = await client.job.findUnique({ where: { id: jobId } });
  if (!job || job.campaignId !== campaignId || job.kind !== 'design-search') {
    throw new DomainError('not_found', 'no design search of this campaign has this id', 'fromJob');
  }
  if (!job.resultJson) {
    throw new DomainError('conflict', `the search has no design to commit (it is ${job.status}); wait for it to finish or start it again`, 'fromJob');
  }
  const envelope = parseJson<{ input?: DesignSpec }>(job.inputJson, {});
  const spec = envelope.input;
  const factors = domainFactors(campaign);
  if (!spec || JSON.stringify(spec.factors) !== JSON.stringify(factors)) {
    throw new DomainError('conflict', "the campaign's factors changed after this search; search again", 'fromJob');
  }
  return storeDesign(campaignId, spec, JSON.parse(job.resultJson) as DesignResult, actor);
}

async function storeDesign(campaignId: string, spec: DesignSpec, result: DesignResult, actor: string) {
  const client = await db();
  return client.$transaction(async (tx) => {
    const last = await tx.design.findFirst({ where: { campaignId }, orderBy: { version: 'desc' } });
    const withdrawn = await tx.run.findMany({ where: { campaignId, source: 'design', trials: { none: {} } }, select: { id: true, runNumber: true } });
    if (withdrawn.length) await tx.run.deleteMany({ where: { id: { in: withdrawn.map((r) => r.id) } } });
    const maxRun = await tx.run.aggregate({ where: { campaignId }, _max: { runNumber: true, plannedOrder: true } });
    const design = await tx.design.create({
      data: {
        campaignId,
        version: (last?.version ?? 0) + 1,
        method: result.method,
        model: result.model,
        seed: spec.seed ?? 1,
        specJson: JSON.stringify({ ...spec, factors: undefined }),
        diagnosticsJson: JSON.stringify(result.diagnostics),
      },
    });
    const firstRun = (maxRun._max.runNumber ?? 0) + 1;
    const firstOrder = (maxRun._max.plannedOrder ?? 0) + 1;
    for (const r of result.runs) {
      await tx.run.create({
        data: {
          campaignId,
          designId: design.id,
          runNumber: firstRun + r.order - 1,
          plannedOrder: firstOrder + r.order - 1,
          valuesJson: JSON.stringify(r.values),
          codedJson: JSON.stringify(r.coded),
          block: r.block ?? null,
          wholePlot: r.wholePlot ?? null,
          source: 'design',
        },
      });
    }
    await audit(tx, actor, 'commit-design', 'design', design.id, withdrawn.length ? { withdrawnRuns: withdrawn.map((w) => w.runNumber) } : null, {
      version: design.version,
      method: result.method,
      model: result.model,
      seed: design.seed,
      runs: result.runs.length,
    });
    return { designId: design.id, version: design.version, runs: result.runs.length, withdrawn: withdrawn.length, diagnostics: result.diagnostics };
  });
}

export type RunState = 'planned' | 'scheduled' | 'running' | 'done' | 'failed' | 'skipped';

export interface RunRow extends RunView {
  state: RunState;
  slot: { rigId: string; rigName: string; start: string; end: string } | null;
  latestTrialId: string | null;
  observations: Record<string, number>;
}

export async function listRuns(campaignId: string): Promise<RunRow[]> {
  const client = await db();
  const runs = await readAllPaged((skip, take) =>
    client.run.findMany({
      where: { campaignId },
      orderBy: [{ plannedOrder: 'asc' }, { id: 'asc' }],
      skip,
      take,
      include: {
        slots: { orderBy: { scheduleVersion: 'desc' }, take: 1, include: { rig: true } },
        trials: { orderBy: { startedAt: 'desc' }, take: 1, include: { observations: true } },
      },
    }),
  );
  return runs.map((r) => {
    const trial = r.trials[0];
    const slot = r.slots[0];
    const state: RunState = trial ? (trial.status as RunState) : slot ? 'scheduled' : 'planned';
    return {
      ...toRunView(r),
      state,
      slot: slot ? { rigId: slot.rigId, rigName: slot.rig.name, start: slot.start.toISOString(), end: slot.end.toISOString() } : null,
      latestTrialId: trial?.id ?? null,
      observations: Object.fromEntries((trial?.observations ?? []).map((o) => [o.name, o.value])),
    };
  });
}

export async function latestDesign(campaignId: string) {
  const client = await db();
  const d = await client.design.findFirst({ where: { campaignId }, orderBy: { version: 'desc' } });
  if (!d) return null;
  return {
    id: d.id,
    version: d.version,
    method: d.method,
    model: d.model,
    seed: d.seed,
    createdAt: d.createdAt.toISOString(),
    diagnostics: parseJson<Record<string, unknown>>(d.diagnosticsJson, {}),
  };
}

/** Add one run (e.g. an accepted next-trial proposal) at the end of the run order. */
export async function addRun(campaignId: string, values: Point, source: 'design' | 'suggestion' | 'import', actor = 'local', reason?: string) {
  const campaign = await getCampaign(campaignId);
  const factors = domainFactors(campaign);
  for (const k of Object.keys(values)) {
    if (!factors.some((f) => f.name === k)) throw invalidInput(`values.${k}`, `"${k}" is not a factor of this campaign; known: ${factors.map((f) => f.name).join(', ')}`);
  }
  const coded = codePoint(factors, values);
  factors.forEach((f, i) => {
    if (f.kind === 'continuous' && Math.abs(coded[i]!) > 1 + 1e-9) {
      throw invalidInput(`values.${f.name}`, `${f.name} must lie between ${f.low} and ${f.high} ${f.unit ?? ''}`.trim());
    }
    if (f.kind === 'discrete' && !f.values.includes(Number(values[f.name]))) {
      throw invalidInput(`values.${f.name}`, `${f.name} must be one of ${f.values.join(', ')}`);
    }
  });
  if (!isFeasible({ factors }, values)) throw new DomainError('infeasible', 'this setting breaks a constraint of the factor space', 'values');
  const client = await db();
  return client.$transaction(async (tx) => {
    const max = await tx.run.aggregate({ where: { campaignId }, _max: { runNumber: true, plannedOrder: true } });
    const run = await tx.run.create({
      data: {
        campaignId,
        runNumber: (max._max.runNumber ?? 0) + 1,
        plannedOrder: (max._max.plannedOrder ?? 0) + 1,
        valuesJson: JSON.stringify(values),
        codedJson: JSON.stringify(coded),
        source,
      },
    });
    await audit(tx, actor, 'add-run', 'run', run.id, null, { values, source, reason });
    return toRunView(run);
  });
}
