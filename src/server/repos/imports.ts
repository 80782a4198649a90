/**
 * Import of past trials: every row of the CSV is validated (src/domain/import/trials.ts); nothing is
 * stored unless the whole file is valid or the user explicitly accepted only the valid rows. The
 * stored rows become runs with source 'import' and finished trials with observations of origin
 * 'import', all in one transaction, so a failure part-way stores nothing. Responses and standard rig
 * readings become the same observations (names, units) that logging the trial at the rig writes.
 */
import { codePoint } from '@/domain/factors';
import { observationField } from '@/domain/metrics/standard-readings';
import { trialsToStore, validateTrialImport, type ImportReport } from '@/domain/import/trials';
import type { z } from 'zod';
import type { trialImportSchema } from '@/server/api/schemas/rig';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { domainFactors, getCampaign } from './campaigns';

export type TrialImportInput = z.output<typeof trialImportSchema>;

export interface ImportResult {
  report: ImportReport;
  /** Runs and trials stored (0 for a dry run). */
  stored: number;
  runNumbers: number[];
  /** Robot or rig names in the file that match nothing in the campaign (stored without the link). */
  unmatched: string[];
}

/** Validate, and unless it is a dry run, store the rows the all-or-nothing rule allows. */
export async function importTrials(campaignId: string, input: TrialImportInput, actor = 'local', now = new Date()): Promise<ImportResult> {
  const campaign = await getCampaign(campaignId);
  const factors = domainFactors(campaign);
  const report = validateTrialImport(input.csv, input.mapping, input.units, factors, campaign.responses, { now: now.toISOString(), robots: campaign.robots });
  if (input.dryRun) return { report, stored: 0, runNumbers: [], unmatched: [] };
  const rows = trialsToStore(report, input.acceptValidRowsOnly);
  const unmatched = new Set<string>();
  const byName = <T extends { id: string; name: string }>(list: T[], name: string | undefined, what: string): string | null => {
    if (!name) return null;
    const hit = list.find((x) => x.name === name) ?? list.find((x) => x.name.toLowerCase() === name.toLowerCase());
    if (!hit) unmatched.add(`${what} '${name}'`);
    return hit?.id ?? null;
  };
  const client = await db();
  let observationCount = 0;
  const runNumbers = await client.$transaction(async (tx) => {
    observationCount = 0;
    const max = await tx.run.aggregate({ where: { campaignId }, _max: { runNumber: true, plannedOrder: true } });
    let runNumber = max._max.runNumber ?? 0;
    let plannedOrder = max._max.plannedOrder ?? 0;
    const numbers: number[] = [];
    for (const row of rows) {
      runNumber += 1;
      plannedOrder += 1;
      const run = await tx.run.create({
        data: {
          campaignId,
          runNumber,
          plannedOrder,
          valuesJson: JSON.stringify(row.factors),
          codedJson: JSON.stringify(codePoint(factors, row.factors)),
          source: 'import',
        },
      });
      const startedAt = new Date(row.startedAt ?? row.finishedAt ?? now.toISOString());
      const finishedAt = row.finishedAt ? new Date(row.finishedAt) : startedAt;
      const trial = await tx.trial.create({
        data: {
          campaignId,
          runId: run.id,
          rigId: byName(campaign.rigs, row.rig, 'rig'),
          robotId: byName(campaign.robots, row.robot, 'robot'),
          operator: row.operator ?? '',
          status: row.passed === false ? 'failed' : 'done',
          passed: row.passed ?? null,
          failureReason: row.failureReason ?? '',
          notes: [row.runLabel ? `imported as '${row.runLabel}'` : '', row.notes ?? ''].filter(Boolean).join('; '),
          startedAt,
          finishedAt,
        },
      });
      // Named and in units as the rig log stores them: a response standing for a standard reading
      // holds it; the other standard readings keep their fixed names and units.
      for (const [name, value] of [...Object.entries(row.responses), ...Object.entries(row.readings)]) {
        if (value === null) continue;
        const unit = observationField(campaign.responses, name)?.unit ?? '';
        await tx.observation.create({ data: { trialId: trial.id, name, value, unit, origin: 'import' } });
        observationCount += 1;
      }
      numbers.push(runNumber);
    }
    await audit(tx, actor, 'import-trials', 'campaign', campaignId, null, {
      fileName: input.fileName,
      rows: report.rows.length,
      stored: rows.length,
      acceptValidRowsOnly: input.acceptValidRowsOnly,
      runNumbers: numbers,
      observations: observationCount,
    });
    return numbers;
  });
  return { report, stored: runNumbers.length, runNumbers, unmatched: [...unmatched] };
}
