/**
 * Findings with whole plots: a campaign with a hard-to-change factor whose runs share whole plots is
 * fitted as a split plot automatically, the page says which error each term was tested against and
 * shows the variance components; residuals against run order and by whole plot and rig. Invented
 * data; the split-plot numbers themselves are checked against statsmodels in
 * test/reference/analysis/split-plot-reml.test.ts.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { AnalysisView, strataSentences, type AnalysisViewData } from '@/components/AnalysisView';
import type { Factor } from '@/domain/factors';
import { RIG_COLUMN, WHOLE_PLOT_COLUMN, findingsPlots, fitWithWholePlots, type DataRow } from '@/server/repos/analyses';

const factors: Factor[] = [
  { name: 'surface', kind: 'continuous', low: 0, high: 1, hardToChange: true },
  { name: 'payload', kind: 'continuous', low: 0.2, high: 1.0 },
];
// 8 whole plots (surface set once per plot, 4 plots at each end), 3 payloads in each; two rigs.
const bedShift = [0.3, -0.4, 0.2, -0.1, 0.5, -0.3, 0.1, -0.2];
const rows: DataRow[] = Array.from({ length: 24 }, (_, i) => {
  const plot = Math.floor(i / 3);
  const surface = plot % 2;
  const payload = [0.2, 0.6, 1.0][i % 3]!;
  return {
    surface,
    payload,
    apex: 150 + 12 * surface - 20 * payload + 10 * bedShift[plot]! + 1.5 * Math.sin(3.7 * i),
    [WHOLE_PLOT_COLUMN]: String(plot + 1),
    [RIG_COLUMN]: plot < 4 ? 'north bench' : 'south bench',
  };
});
const base = { data: rows, response: 'apex', terms: ['surface', 'payload'], factors, coding: 'coded' as const };

function view(fit: ReturnType<typeof fitWithWholePlots>): AnalysisViewData {
  // As the page receives it: through JSON (NaN sums of squares become null).
  const result = JSON.parse(JSON.stringify(fit.result));
  return { response: 'apex', model: 'main-effects', n: rows.length, result, plots: JSON.parse(JSON.stringify(findingsPlots(fit.result, rows))), ...(fit.splitPlotNote ? { splitPlotNote: fit.splitPlotNote } : {}) };
}

describe('findings with whole plots', () => {
  it('fits the split plot automatically and says which error each term is tested against', () => {
    const fit = fitWithWholePlots(base, factors);
    expect(fit.request.wholePlot).toBe(WHOLE_PLOT_COLUMN);
    expect(fit.splitPlotNote).toBeUndefined();
    const r = fit.result;
    expect(r.splitPlot!.wholePlots).toBe(8);
    // Balanced: surface on 8 − 2 = 6 df, payload on 24 − 3 − 6 = 15 df.
    expect(strataSentences(r.anova as AnalysisViewData['result']['anova'])).toEqual(['surface tested against whole-plot error, 6 df', 'payload tested against subplot error, 15 df']);
    const html = renderToStaticMarkup(createElement(AnalysisView, { data: view(fit) }));
    expect(html).toContain('Split-plot fit');
    expect(html).toContain('surface tested against whole-plot error, 6 df');
    expect(html).toContain('Variance components: whole plot');
    expect(html).toContain('Error df (KR)');
    expect(html).toContain('Residuals against run order');
    expect(html).toContain('Residuals by whole plot');
    expect(html).toContain('Residuals by rig');
  });

  it('draws residuals against run order and grouped by whole plot and by rig', () => {
    const fit = fitWithWholePlots(base, factors);
    const plots = findingsPlots(fit.result, rows);
    expect(plots.byOrder!.map((p) => p.x)).toEqual(Array.from({ length: 24 }, (_, i) => i + 1));
    expect(plots.byOrder!.map((p) => p.y)).toEqual(fit.result.residuals);
    expect(plots.byWholePlot!.map((g) => g.label)).toEqual(['1', '2', '3', '4', '5', '6', '7', '8']);
    expect(plots.byWholePlot!.every((g) => g.values.length === 3)).toBe(true);
    expect(plots.byRig!.map((g) => [g.label, g.values.length])).toEqual([['north bench', 12], ['south bench', 12]]);
    expect(plots.halfNormal).toBeNull();
  });

  it('fits least squares without hard-to-change factors or whole plots, with run order still drawn', () => {
    const easy = factors.map((f) => ({ ...f, hardToChange: false }));
    const fit = fitWithWholePlots({ ...base, factors: easy }, easy);
    expect(fit.request.wholePlot).toBeUndefined();
    expect(fit.result.splitPlot).toBeUndefined();
    const noPlots = rows.map(({ [WHOLE_PLOT_COLUMN]: _wp, [RIG_COLUMN]: _rig, ...rest }) => rest);
    const plain = fitWithWholePlots({ ...base, data: noPlots }, factors);
    expect(plain.result.splitPlot).toBeUndefined();
    const plots = findingsPlots(plain.result, noPlots);
    expect(plots.byOrder).toHaveLength(24);
    expect(plots.byWholePlot).toBeNull();
    expect(plots.byRig).toBeNull();
  });

  it('falls back to least squares and says why when the whole plots cannot carry a split-plot fit', () => {
    const single = rows.map((r, i) => ({ ...r, [WHOLE_PLOT_COLUMN]: String(i + 1) }));
    const fit = fitWithWholePlots({ ...base, data: single }, factors);
    expect(fit.result.splitPlot).toBeUndefined();
    expect(fit.splitPlotNote).toMatch(/not as a split plot: .*subplot error/);
    const html = renderToStaticMarkup(createElement(AnalysisView, { data: view(fit) }));
    expect(html).toContain('not as a split plot');
    expect(html).toContain('Analysis of variance');
  });
});
