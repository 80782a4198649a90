'use client';
/** Coefficients with standard errors and the ANOVA table of a fitted model. */
import { DataTable, type ColumnSpec } from './DataTable';

export interface AnalysisViewData {
  response: string;
  model: string;
  n: number;
  result: {
    coefficients: { term: string; estimate: number; stdError: number | null; statistic: number | null; p: number | null; ci95: [number, number] | null }[];
    anova: { source: string; df: number; ss: number; ms: number | null; f: number | null; p: number | null }[];
    rSquared: number;
    adjustedRSquared: number;
    residualStdError: number | null;
    residualDf: number;
    aliased?: string[];
    lackOfFit?: { f: number; p: number; lackOfFitDf: number; pureErrorDf: number };
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

export function AnalysisView({ data }: { data: AnalysisViewData }) {
  const r = data.result;
  const coefRows = r.coefficients.map((c) => ({ ...c, lo: c.ci95?.[0] ?? null, hi: c.ci95?.[1] ?? null }));
  return (
    <section className="panel" data-testid="analysis-result">
      <h2 style={{ marginTop: 0 }}>
        {data.response}: {data.model} model, {data.n} trials
      </h2>
      <p>
        R² = {r.rSquared.toFixed(4)}, adjusted R² = {r.adjustedRSquared.toFixed(4)}, residual standard error ={' '}
        {r.residualStdError === null ? '—' : Number(r.residualStdError.toPrecision(4))} on {r.residualDf} df
        {r.lackOfFit ? `; lack of fit F = ${r.lackOfFit.f.toFixed(2)} on ${r.lackOfFit.lackOfFitDf} and ${r.lackOfFit.pureErrorDf} df, p = ${r.lackOfFit.p.toFixed(4)}` : ''}.
      </p>
      {r.aliased?.length ? <p className="warning">Not estimable from these runs (aliased with earlier terms): {r.aliased.join(', ')}.</p> : null}
      <h3>Coefficients (coded units, −1 … +1)</h3>
      <DataTable columns={COEF} rows={coefRows} testId="coefficients-table" />
      <h3>Analysis of variance</h3>
      <DataTable columns={ANOVA} rows={r.anova} testId="anova-table" />
    </section>
  );
}
