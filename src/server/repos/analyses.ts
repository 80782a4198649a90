/** Fitting the campaign's logged trials, and storing each fit frozen with the data it used. */
import {
  analyze,
  canonicalAnalysis,
  contourGrid,
  interactionPlot,
  normalQuantile,
  quadraticForm,
  screeningEffects,
  stationaryPoint,
  type AnalysisRequest,
  type AnalysisResult,
} from '@/domain/analysis';
import { DomainError } from '@/domain/errors';
import { standardTerms, type Factor, type StandardModel } from '@/domain/factors';
import { observationFields } from '@/domain/metrics/standard-readings';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { domainFactors, getCampaign } from './campaigns';
import { parseJson } from './mappers';
import { readAllPaged } from './paged';

export type DataRow = Record<string, number | string>;

/**
 * Extra columns of campaign data rows: the run's whole plot and the rig the trial ran on, where known.
 * Factor and response names start with a letter, so these never collide with them.
 */
export const WHOLE_PLOT_COLUMN = '_wholePlot';
export const RIG_COLUMN = '_rig';

/**
 * One row per finished trial that has the response: factor values of its run plus every observation,
 * in the order the trials started (run order in time), with the whole plot and rig where known.
 */
export async function campaignData(campaignId: string): Promise<{ rows: DataRow[]; factors: Factor[] }> {
  const campaign = await getCampaign(campaignId);
  const client = await db();
  const trials = await readAllPaged((skip, take) =>
    client.trial.findMany({
      where: { campaignId, status: { in: ['done', 'failed'] } },
      orderBy: [{ startedAt: 'asc' }, { id: 'asc' }],
      skip,
      take,
      include: { observations: true, run: true, rig: { select: { name: true } } },
    }),
  );
  // Whole-plot numbers are per design: prefix the design when the trials come from several.
  const designs = [...new Set(trials.filter((t) => t.run.wholePlot !== null).map((t) => t.run.designId ?? ''))];
  const rows = trials.map((t) => {
    const values = parseJson<DataRow>(t.run.valuesJson, {});
    const row: DataRow = { ...values, run: t.run.runNumber, passed: t.passed === false ? 0 : 1 };
    if (t.run.wholePlot !== null) row[WHOLE_PLOT_COLUMN] = designs.length > 1 ? `${designs.indexOf(t.run.designId ?? '') + 1}.${t.run.wholePlot}` : String(t.run.wholePlot);
    if (t.rig) row[RIG_COLUMN] = t.rig.name;
    for (const o of t.observations) row[o.name] = o.value;
    return row;
  });
  return { rows, factors: domainFactors(campaign) };
}

/** Terms of a standard model that the data can support: drop terms of factors that never vary. */
export function supportedTerms(factors: Factor[], rows: DataRow[], model: StandardModel): { terms: string[]; dropped: string[] } {
  const varying = new Set(factors.filter((f) => new Set(rows.map((r) => String(r[f.name]))).size > 1).map((f) => f.name));
  const all = standardTerms(factors, model).filter((t) => t.parts.length > 0);
  const terms: string[] = [];
  const dropped: string[] = [];
  for (const t of all) {
    if (t.parts.every((p) => varying.has(p.name))) terms.push(t.label);
    else dropped.push(t.label);
  }
  return { terms, dropped };
}

export async function fitCampaign(campaignId: string, response: string, model: StandardModel, terms?: string[], actor = 'local') {
  const campaign = await getCampaign(campaignId);
  // A response of the campaign, or a standard rig reading logged under its fixed name (apex_height, …).
  const fittable = observationFields(campaign.responses).map((f) => f.name);
  if (!fittable.includes(response)) {
    throw new DomainError('invalid_input', `"${response}" is not a response or standard reading of this campaign; known: ${fittable.join(', ')}`, 'response');
  }
  const { rows, factors } = await campaignData(campaignId);
  const usable = rows.filter((r) => typeof r[response] === 'number');
  if (usable.length === 0) throw new DomainError('invalid_input', `no finished trial has a value of ${response} yet; log trials at the rig first`, 'response');
  const chosen = terms ?? supportedTerms(factors, usable, model).terms;
  const base = { data: usable, response, terms: chosen, factors, coding: 'coded' as const };
  const { request, result, splitPlotNote } = fitWithWholePlots(base, factors);
  const client = await db();
  const stored = await client.$transaction(async (tx) => {
    const a = await tx.analysis.create({
      data: {
        campaignId,
        response,
        termsJson: JSON.stringify(chosen),
        requestJson: JSON.stringify({ ...request, model, ...(splitPlotNote ? { splitPlotNote } : {}) }),
        resultJson: JSON.stringify(result),
      },
    });
    await audit(tx, actor, 'fit', 'analysis', a.id, null, { response, terms: chosen, n: usable.length, ...(request.wholePlot ? { wholePlot: true } : {}) });
    return a;
  });
  return { id: stored.id, response, model, terms: chosen, n: usable.length, result, plots: findingsPlots(result, usable), ...(splitPlotNote ? { splitPlotNote } : {}) };
}

type FitRequest = AnalysisRequest & { data: DataRow[] };

/**
 * When the campaign has hard-to-change factors and every run used belongs to a whole plot, fit the
 * split-plot model (REML with a whole-plot random effect, Kenward–Roger df), so that whole-plot
 * factors are tested against whole-plot error. When the whole plots cannot support it (e.g. one run
 * per plot), fall back to least squares and say why.
 */
export function fitWithWholePlots(base: FitRequest, factors: Factor[]): { request: FitRequest; result: AnalysisResult; splitPlotNote?: string } {
  const hard = factors.some((f) => f.hardToChange);
  const labels = base.data.map((r) => r[WHOLE_PLOT_COLUMN]);
  const hasPlots = hard && labels.every((l) => l !== undefined && l !== '') && new Set(labels).size >= 2;
  if (hasPlots) {
    const request = { ...base, wholePlot: WHOLE_PLOT_COLUMN };
    try {
      return { request, result: analyze(request) };
    } catch (e) {
      if (!(e instanceof DomainError)) throw e;
      return { request: base, result: analyze(base), splitPlotNote: `Fitted by least squares, not as a split plot: ${e.message}.` };
    }
  }
  return { request: base, result: analyze(base) };
}

/** Everything the findings page draws, computed from a fit and the data it used. */
export function findingsPlots(result: AnalysisResult, rows: DataRow[]) {
  const effects = result.coefficients
    .filter((c) => c.term !== '(Intercept)')
    .map((c) => ({ label: c.term, value: c.estimate, lo: c.ci95?.[0] ?? null, hi: c.ci95?.[1] ?? null, highlight: c.p !== null && c.p < 0.05 }))
    .sort((a, b) => Math.abs(b.value) - Math.abs(a.value));
  const residuals = result.fitted.map((f, i) => ({ x: f, y: result.residuals[i]! }));
  const n = result.residuals.length;
  // Blom plotting positions for the normal quantile plot of residuals.
  const normal = result.residuals
    .slice()
    .sort((a, b) => a - b)
    .map((r, i) => ({ x: normalQuantile((i + 1 - 0.375) / (n + 0.25)), y: r }));
  const numeric = result.factors.filter((f) => f.kind !== 'categorical' && result.terms.some((t) => t.split('*').some((p) => p.split('^')[0] === f.name)));
  let contour = null;
  let interaction = null;
  if (numeric.length >= 2) {
    const [fx, fy] = [numeric[0]!.name, numeric[1]!.name];
    const g = contourGrid(result, fx, fy, undefined, 31);
    contour = { ...g, points: rows.map((r) => ({ x: Number(r[fx]), y: Number(r[fy]) })) };
    if (result.terms.some((t) => t === `${fx}*${fy}` || t === `${fy}*${fx}`)) interaction = interactionPlot(result, fx, fy);
  }
  let surface = null;
  if (result.terms.some((t) => /\^2$/.test(t))) {
    try {
      const form = quadraticForm(result);
      surface = { stationary: stationaryPoint(result, form), canonical: canonicalAnalysis(form) };
    } catch {
      surface = null;
    }
  }
  return { effects, residuals, normal, contour, interaction, surface, halfNormal: halfNormalOf(result, rows), ...residualsInTime(result, rows) };
}

/**
 * Residuals against run order (the order the trials started; campaign data come in that order), and
 * grouped by whole plot and by rig where the rows say so. Whole plots come from a split-plot fit or
 * from the rows' whole-plot column.
 */
function residualsInTime(result: AnalysisResult, rows: DataRow[]) {
  const excluded = new Set(result.excludedRows ?? []);
  const used = rows.filter((_, i) => !excluded.has(i));
  if (used.length !== result.residuals.length) return { byOrder: null, byWholePlot: null, byRig: null };
  const byOrder = result.residuals.map((r, i) => ({ x: i + 1, y: r }));
  const grouped = (key: (row: DataRow, i: number) => string | undefined) => {
    const keys = used.map(key);
    if (keys.every((k) => k === undefined)) return null;
    const groups: { label: string; values: number[] }[] = [];
    const index = new Map<string, number>();
    keys.forEach((k, i) => {
      const label = k ?? 'not recorded';
      let g = index.get(label);
      if (g === undefined) {
        index.set(label, (g = groups.length));
        groups.push({ label, values: [] });
      }
      groups[g]!.values.push(result.residuals[i]!);
    });
    return groups;
  };
  const plotOf = result.splitPlot?.wholePlotOf;
  const byWholePlot = grouped((row, i) => plotOf?.[i] ?? (row[WHOLE_PLOT_COLUMN] === undefined ? undefined : String(row[WHOLE_PLOT_COLUMN])));
  const byRig = grouped((row) => (row[RIG_COLUMN] === undefined ? undefined : String(row[RIG_COLUMN])));
  return { byOrder, byWholePlot, byRig };
}

/**
 * Half-normal plot with Lenth's margins of error, for two-level designs: every factor in the model
 * numeric with exactly two settings in the data, and no power terms.
 */
function halfNormalOf(result: AnalysisResult, rows: DataRow[]) {
  // Effects of a split plot have unequal standard errors (two strata): no common half-normal scale.
  if (result.splitPlot) return null;
  const used = result.factors.filter((f) => result.terms.some((t) => t.split('*').some((p) => p.split('^')[0] === f.name)));
  const twoLevel = used.length > 0 && used.every((f) => f.kind !== 'categorical' && new Set(rows.map((r) => Number(r[f.name]))).size === 2);
  if (!twoLevel || result.terms.some((t) => t.includes('^'))) return null;
  try {
    const s = screeningEffects({ data: rows, response: result.response, terms: result.terms, factors: result.factors, coding: 'coded' });
    return { points: s.halfNormal, me: s.lenth?.me ?? null, sme: s.lenth?.sme ?? null, active: s.effects.filter((e) => e.active).map((e) => e.label) };
  } catch {
    return null;
  }
}

export type FindingsPlots = ReturnType<typeof findingsPlots>;

export async function latestAnalysis(campaignId: string, response?: string) {
  const client = await db();
  const a = await client.analysis.findFirst({ where: { campaignId, ...(response ? { response } : {}) }, orderBy: { createdAt: 'desc' } });
  if (!a) return null;
  const req = parseJson<{ model?: StandardModel; data?: DataRow[]; splitPlotNote?: string }>(a.requestJson, {});
  return {
    id: a.id,
    response: a.response,
    model: req.model ?? 'main-effects',
    terms: parseJson<string[]>(a.termsJson, []),
    n: req.data?.length ?? 0,
    createdAt: a.createdAt.toISOString(),
    result: parseJson<AnalysisResult>(a.resultJson, {} as AnalysisResult),
    plots: req.data ? findingsPlots(parseJson<AnalysisResult>(a.resultJson, {} as AnalysisResult), req.data) : null,
    ...(req.splitPlotNote ? { splitPlotNote: req.splitPlotNote } : {}),
  };
}
