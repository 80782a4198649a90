/**
 * Findings of a split-plot campaign on a real database: a design with whole plots (surface is hard to
 * change), trials logged on two rigs, and the fit that follows is a split plot by itself — the surface
 * is tested against whole-plot error, the variance components are stored, and the residual plots by
 * run order, whole plot and rig come back with the stored fit. Invented scenario.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb } from '@/server/db/client';
import { campaignData, fitCampaign, latestAnalysis, WHOLE_PLOT_COLUMN } from '@/server/repos/analyses';
import { createCampaign, getCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { finishTrial, startTrial } from '@/server/repos/trials';
import { freshDatabase } from './database';

const NOW = new Date('2026-03-02T12:00:00Z');

describe('split-plot findings on a real database', () => {
  let campaignId = '';

  beforeAll(async () => {
    await freshDatabase();
    const input = campaignCreateSchema.parse({
      name: 'Surface beds (split plot)',
      factors: [
        { name: 'surface', kind: 'continuous', unit: 'Shore A', low: 20, high: 80, hardToChange: true, changeMinutes: 45 },
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0.2, high: 1.8 },
      ],
      responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
      robots: [{ name: 'R1', massGrams: 1, heightMm: 45 }],
      rigs: [{ name: 'North bench' }, { name: 'South bench' }],
    });
    campaignId = (await createCampaign(input, 'tester')).id;
  });
  afterAll(async () => {
    await closeDb();
  });

  it('fits the logged trials as a split plot and keeps the residual plots with the stored fit', async () => {
    const design = await commitDesign(campaignId, { method: 'optimal', model: 'main-effects', runs: 16, wholePlots: 8, seed: 3 }, 'tester');
    expect(design.runs).toBe(16);
    const runs = (await listRuns(campaignId)).sort((a, b) => a.plannedOrder - b.plannedOrder);
    const c = await getCampaign(campaignId);
    for (const [i, run] of runs.entries()) {
      const surface = Number(run.values.surface);
      const payload = Number(run.values.payload);
      const plotShift = [6, -4, 3, -7, 5, -2, 1, -3][(run.wholePlot ?? 0) % 8]!;
      const apex = 200 + 0.3 * (surface - 50) - 15 * (payload - 1) + plotShift + 2 * Math.sin(2.1 * i);
      const rigId = c.rigs[i % 2]!.id;
      const started = new Date(NOW.getTime() + i * 600_000);
      const { trial } = await startTrial(campaignId, { runId: run.id, rigId, operator: 'op' }, `split-${i}-key`, 'tester', started);
      await finishTrial(campaignId, trial.id, { observations: { apex_height: Number(apex.toFixed(1)) }, status: 'done', failureReason: '', notes: '' }, 'tester', new Date(started.getTime() + 300_000));
    }
    const { rows } = await campaignData(campaignId);
    expect(rows.every((r) => r[WHOLE_PLOT_COLUMN] !== undefined)).toBe(true);

    const fit = await fitCampaign(campaignId, 'apex_height', 'main-effects', undefined, 'tester');
    expect(fit.result.splitPlot).toBeDefined();
    expect(fit.result.varianceComponents!.residual).toBeGreaterThan(0);
    const surface = fit.result.anova.find((a) => a.source === 'surface')!;
    expect(surface.stratum).toBe('whole plot');
    expect(surface.denominatorDf!).toBeGreaterThan(1);
    expect(surface.denominatorDf!).toBeLessThan(8);
    expect(fit.plots.byOrder).toHaveLength(16);
    expect(fit.plots.byRig!.map((g) => g.label).sort()).toEqual(['North bench', 'South bench']);
    expect(fit.plots.byWholePlot!.length).toBe(fit.result.splitPlot!.wholePlots);

    const latest = await latestAnalysis(campaignId, 'apex_height');
    expect(latest!.result.splitPlot!.wholePlots).toBe(fit.result.splitPlot!.wholePlots);
    expect(latest!.plots!.byOrder).toHaveLength(16);
    expect(latest!.plots!.byWholePlot!.length).toBe(fit.result.splitPlot!.wholePlots);
  });
});
