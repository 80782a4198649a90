'use client';
/** Coefficients with standard errors and the ANOVA table of a fitted model. */
import { ContourPlot, GroupedPoints, InteractionChart, IntervalBars, ScatterPlot, type PointGroup } from './charts';
import { DataTable, type ColumnSpec } from './DataTable';

export interface FindingsPlotsData {
  effects: { label: string; value: number; lo: number | null; hi: number | null; highlight: boolean }[];
  residuals: { x: number; y: number }[];
  normal: { x: number; y: number }[];
  /** Residuals against run order (trials in the order they started), and grouped by whole plot and by rig where known. */
  byOrder?: { x: number; y: number }[] | null;
  byWholePlot?: PointGroup[] | null;
  byRig?: PointGroup[] | null;
  contour: { factorX: string; factorY: string; x: number[]; y: number[]; z: number[][]; held: Record<string, string | number>; points: { x: number; y: number }[] } | null;
  interaction: { factorA: string; factorB: string; levelsA: (number | string)[]; lines: { levelB: number | string; predicted: number[] }[]; held: Record<string, string | number> } | null;
  halfNormal?: { points: { label: string; absEffect: number; quantile: number }[]; me: number | null; sme: number | null; active: string[] } | null;
  surface: {
    stationary: { natural: Record<string, number>; predicted: number } | null;
    canonical: { eigenvalues: number[]; kind: string };
  } | null;
}

export interface AnalysisViewData {
  plots?: FindingsPlotsData | null;
  response: string;
  model: string;
  n: number;
  /** Why a campaign with whole plots was fitted by least squares instead of as a split plot. */
  splitPlotNote?: string;
  result: {
    coefficients: { term: string; estimate: number; stdError: number | null; statistic: number | null; p: number | null; ci95: [number, number] | null; df?: number }[];
    anova: { source: string; df: number; ss: number | null; ms: number | null; f: number | null; p: number | null; denominatorDf?: number; stratum?: string }[];
    /** null in JSON where not defined (e.g. adjusted R² of a split-plot fit). */
    rSquared: number | null;
    adjustedRSquared: number | null;
    residualStdError: number | null;
    residualDf: number;
    aliased?: string[];
    lackOfFit?: { f: number; p: number; lackOfFitDf: number; pureErrorDf: number };
    varianceComponents?: { wholePlot: number; residual: number };
    splitPlot?: { wholePlots: number; wholePlotErrorDf: number; subplotErrorDf: number };
  };
}

const COEF: ColumnSpec[] = [
  { key: 'term', header: 'Term', format: 'text' },
  { key: 'estimate', header: 'Estimate', format: 'number', digits: 5 },
  { key: 'stdError', header: 'Std. error', format: 'number', digits: 4 },
  { key: 'statistic', header: 't', format: 'fixed', digits: 2 },
  { key: 'p', header: 'p', format: 'p' },
  { key: 'lo', header: '95% low', format: 'number', digits: 4 },
  { key: 'hi', header: '95% high', format: 'number', digits: 4 },
];
const ANOVA: ColumnSpec[] = [
  { key: 'source', header: 'Source', format: 'text' },
  { key: 'df', header: 'df', format: 'number' },
  { key: 'ss', header: 'Sum of squares', format: 'number', digits: 5 },
  { key: 'ms', header: 'Mean square', format: 'number', digits: 5 },
  { key: 'f', header: 'F', format: 'fixed', digits: 2 },
  { key: 'p', header: 'p', format: 'p' },
];
const SPLIT_COEF: ColumnSpec[] = [...COEF.slice(0, 4), { key: 'df', header: 'df (KR)', format: 'fixed', digits: 1 }, ...COEF.slice(4)];
const SPLIT_ANOVA: ColumnSpec[] = [
  { key: 'source', header: 'Source', format: 'text' },
  { key: 'stratum', header: 'Tested against', format: 'text' },
  { key: 'df', header: 'df', format: 'number' },
  { key: 'denominatorDf', header: 'Error df (KR)', format: 'fixed', digits: 1 },
  { key: 'f', header: 'F', format: 'fixed', digits: 2 },
  { key: 'p', header: 'p', format: 'p' },
];

const num = (v: number | null | undefined, digits = 4) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : Number(v.toPrecision(digits)).toString());
const dfText = (v: number) => (Math.abs(v - Math.round(v)) < 0.05 ? String(Math.round(v)) : v.toFixed(1));

/** One sentence per term saying which error it was tested against, e.g. "surface tested against whole-plot error, 5 df". */
export function strataSentences(anova: AnalysisViewData['result']['anova']): string[] {
  return anova.filter((a) => a.denominatorDf !== undefined).map((a) => `${a.source} tested against ${a.stratum === 'whole plot' ? 'whole-plot' : 'subplot'} error, ${dfText(a.denominatorDf!)} df`);
}

export function AnalysisView({ data }: { data: AnalysisViewData }) {
  const r = data.result;
  const coefRows = r.coefficients.map((c) => ({ ...c, lo: c.ci95?.[0] ?? null, hi: c.ci95?.[1] ?? null }));
  const sp = r.splitPlot;
  const vc = r.varianceComponents;
  return (
    <section className="panel" data-testid="analysis-result">
      <h2 style={{ marginTop: 0 }}>
        {data.response}: {data.model} model, {data.n} trials
      </h2>
      {sp && vc ? (
        <div data-testid="split-plot-summary">
          <p>
            <strong>Split-plot fit</strong>: the runs share {sp.wholePlots} whole plots (hard-to-change settings), so the model has a
            whole-plot random effect, fitted by restricted maximum likelihood, with Kenward–Roger degrees of freedom. Variance
            components: whole plot {num(vc.wholePlot)}, residual {num(vc.residual)} (standard deviations {num(Math.sqrt(vc.wholePlot))} and{' '}
            {num(Math.sqrt(vc.residual))}). R² of the fixed effects = {num(r.rSquared)}.
          </p>
          <ul className="strata">
            {strataSentences(r.anova).map((t) => (
              <li key={t}>{t}</li>
            ))}
          </ul>
        </div>
      ) : (
        <p>
          R² = {num(r.rSquared)}, adjusted R² = {num(r.adjustedRSquared)}, residual standard error = {num(r.residualStdError)} on {r.residualDf} df
          {r.lackOfFit ? `; lack of fit F = ${r.lackOfFit.f.toFixed(2)} on ${r.lackOfFit.lackOfFitDf} and ${r.lackOfFit.pureErrorDf} df, p = ${r.lackOfFit.p.toFixed(4)}` : ''}.
        </p>
      )}
      {data.splitPlotNote ? <p className="warning">{data.splitPlotNote}</p> : null}
      {r.aliased?.length ? <p className="warning">Not estimable from these runs (aliased with earlier terms): {r.aliased.join(', ')}.</p> : null}
      <h3>Coefficients (coded units, −1 … +1)</h3>
      <DataTable columns={sp ? SPLIT_COEF : COEF} rows={coefRows} testId="coefficients-table" />
      <h3>{sp ? 'Tests of the terms (Kenward–Roger F)' : 'Analysis of variance'}</h3>
      <DataTable columns={sp ? SPLIT_ANOVA : ANOVA} rows={r.anova} testId="anova-table" />
      {data.plots ? <FindingsPlots response={data.response} plots={data.plots} splitPlot={Boolean(sp)} /> : null}
    </section>
  );
}

const held = (h: Record<string, string | number>) =>
  Object.entries(h)
    .map(([k, v]) => `${k} = ${typeof v === 'number' ? Number(v.toPrecision(4)) : v}`)
    .join(', ');

function FindingsPlots({ response, plots, splitPlot }: { response: string; plots: FindingsPlotsData; splitPlot: boolean }) {
  const s = plots.surface;
  return (
    <>
      <h3>What drives {response}</h3>
      <p className="muted">Coefficients in coded units (the change from the centre to the high end of each factor) with 95% intervals; dark bars are significant at 5%.</p>
      {splitPlot ? <p className="muted">Residuals are the observed values less the fixed-effect fit, so each includes its whole plot&apos;s deviation.</p> : null}
      <div className="charts">
        <IntervalBars title={`Effects on ${response}, largest first`} bars={plots.effects} xLabel="coefficient (coded units)" />
        <ScatterPlot title="Residuals against fitted values" points={plots.residuals} xLabel="fitted" yLabel="residual" refLine={{ a: 0, b: 0 }} />
        <ScatterPlot title="Normal quantile plot of residuals" points={plots.normal} xLabel="normal quantile" yLabel="residual" />
        {plots.byOrder ? (
          <ScatterPlot title="Residuals against run order (trials in the order they started)" points={plots.byOrder} xLabel="run order" yLabel="residual" refLine={{ a: 0, b: 0 }} />
        ) : null}
        {plots.byWholePlot ? (
          <GroupedPoints title="Residuals by whole plot (bar: the plot's mean)" groups={plots.byWholePlot} xLabel="whole plot" yLabel="residual" />
        ) : null}
        {plots.byRig ? <GroupedPoints title="Residuals by rig (bar: the rig's mean)" groups={plots.byRig} xLabel="rig" yLabel="residual" /> : null}
        {plots.contour ? (
          <ContourPlot
            title={`Fitted ${response} over ${plots.contour.factorX} and ${plots.contour.factorY}${Object.keys(plots.contour.held).length ? ` (${held(plots.contour.held)})` : ''}`}
            x={plots.contour.x}
            y={plots.contour.y}
            z={plots.contour.z}
            points={plots.contour.points}
            xLabel={plots.contour.factorX}
            yLabel={plots.contour.factorY}
          />
        ) : null}
        {plots.halfNormal ? (
          <ScatterPlot
            title={`Half-normal plot of effects${plots.halfNormal.me !== null ? ` (dashed: Lenth's margin of error ${Number(plots.halfNormal.me.toPrecision(3))})` : ''}`}
            points={plots.halfNormal.points.map((p) => ({ x: p.quantile, y: p.absEffect, label: p.label }))}
            xLabel="half-normal quantile"
            yLabel="|effect|"
            refLine={plots.halfNormal.me !== null ? { a: plots.halfNormal.me, b: 0 } : undefined}
          />
        ) : null}
        {plots.interaction ? (
          <InteractionChart
            title={`Interaction of ${plots.interaction.factorA} and ${plots.interaction.factorB}`}
            levelsA={plots.interaction.levelsA}
            lines={plots.interaction.lines}
            xLabel={plots.interaction.factorA}
            yLabel={response}
          />
        ) : null}
      </div>
      {s ? (
        <p data-testid="surface-summary">
          Fitted surface: <strong>{s.canonical.kind}</strong> (eigenvalues {s.canonical.eigenvalues.map((e) => Number(e.toPrecision(3))).join(', ')})
          {s.stationary ? `; stationary point at ${held(s.stationary.natural)}, predicted ${Number(s.stationary.predicted.toPrecision(4))}` : ''}.
        </p>
      ) : null}
    </>
  );
}
