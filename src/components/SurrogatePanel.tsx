'use client';
/**
 * Next trials from the Gaussian-process surrogate: a batch with the reason for each, the surrogate's
 * mean ± 2 sd along every factor, and accept some or all as new runs.
 */
import { usePathname, useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { BandPlot } from './charts';
import { ErrorBox } from './FieldError';
import { JobProgress, useJob, type JobState } from './JobProgress';

interface BatchSuggestion {
  id: string;
  values: Record<string, string | number>;
  mean: number;
  sd: number;
  acquisition: number;
  feasibility?: number;
  reason: string;
}
interface Batch {
  response: string;
  unit: string;
  goal: string;
  strategy: string;
  suggestions: BatchSuggestion[];
  model: { kernel: string; lengthScales: Record<string, number>; noiseVariance: number; logMarginalLikelihood: number; observations: number; leaveOneOut: { rmse: number; withinTwoSd: number } };
  slices: { factor: string; points: { value: string | number; mean: number; sd: number }[] }[];
}

const p4 = (v: number) => Number(v.toPrecision(4));

/** The batch's computation, run as a job: polled until it ends. */
function BatchJob({ id, onEnd }: { id: string; onEnd: (job: JobState<Batch>) => void }) {
  const { job, error } = useJob<Batch>(id, onEnd);
  return <JobProgress job={job} error={error} label="Surrogate batch" />;
}

export function SurrogatePanel({
  campaignId,
  responses,
  units,
  initialJob = null,
}: {
  campaignId: string;
  responses: { name: string; unit?: string }[];
  units: Record<string, string>;
  /** A batch job from the page's URL (leaving the page and coming back finds it again). */
  initialJob?: string | null;
}) {
  const router = useRouter();
  const pathname = usePathname();
  const [jobId, setJobId] = useState<string | null>(initialJob);
  const [response, setResponse] = useState(responses[0]?.name ?? '');
  const [strategy, setStrategy] = useState('improve');
  const [count, setCount] = useState('4');
  const [threshold, setThreshold] = useState('0.8');
  const [batch, setBatch] = useState<Batch | null>(null);
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [error, setError] = useState<ApiError | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function propose(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setMessage(null);
    setBusy(true);
    setBatch(null);
    // The fit and the batch run as a job (progress, cancel); the stored proposals arrive as its result.
    const res = await postJson<{ id: string }>('/api/v1/jobs', {
      kind: 'suggestions',
      campaignId,
      input: {
        response,
        strategy,
        count: Number(count),
        feasibilityThreshold: threshold.trim() ? Number(threshold) : undefined,
      },
    });
    if (!res.ok) {
      setBusy(false);
      return setError({ ...res.error, field: res.error.field?.replace(/^input\./, '') ?? null });
    }
    setJobId(res.data.id);
    router.replace(`${pathname}?job=${encodeURIComponent(res.data.id)}`, { scroll: false });
  }

  function batchEnded(job: JobState<Batch>) {
    setBusy(false);
    if (job.status === 'done' && job.result) {
      setBatch(job.result);
      setChosen(new Set(job.result.suggestions.map((s) => s.id)));
    }
  }

  async function accept() {
    if (!batch) return;
    setError(null);
    setBusy(true);
    const added: number[] = [];
    for (const s of batch.suggestions.filter((x) => chosen.has(x.id))) {
      const res = await postJson<{ run: { runNumber: number } }>(`/api/v1/campaigns/${campaignId}/suggestions/${s.id}/accept`, {});
      if (!res.ok) {
        setBusy(false);
        return setError(res.error);
      }
      added.push(res.data.run.runNumber);
    }
    setBusy(false);
    setMessage(`Added ${added.length} runs to the campaign (runs ${added.join(', ')}); place them on the week plan to schedule them.`);
    setBatch(null);
    router.refresh();
  }

  const unit = batch?.unit ? ` ${batch.unit}` : '';
  const best = batch?.suggestions[0];
  return (
    <section className="panel">
      <h2 style={{ marginTop: 0 }}>Next trials from the surrogate</h2>
      <form onSubmit={propose} noValidate className="row">
        <div>
          <label htmlFor="g-response">Response</label>
          <select id="g-response" value={response} onChange={(e) => setResponse(e.target.value)}>
            {responses.map((r) => (
              <option key={r.name} value={r.name}>
                {r.name}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="g-strategy">Strategy</label>
          <select id="g-strategy" value={strategy} onChange={(e) => setStrategy(e.target.value)}>
            <option value="improve">improve: expected improvement</option>
            <option value="explore">explore: reduce uncertainty</option>
            <option value="refine">refine the linear model</option>
            <option value="confirm">confirm the predicted best</option>
          </select>
        </div>
        <div className="narrow">
          <label htmlFor="g-count">Trials</label>
          <input id="g-count" inputMode="numeric" value={count} onChange={(e) => setCount(e.target.value)} aria-invalid={error?.field === 'count' || undefined} />
        </div>
        <div className="narrow">
          <label htmlFor="g-threshold">Min. P(no failure)</label>
          <input id="g-threshold" inputMode="decimal" value={threshold} onChange={(e) => setThreshold(e.target.value)} aria-invalid={error?.field === 'feasibilityThreshold' || undefined} />
        </div>
        <div>
          <button type="submit" className="btn" disabled={busy}>
            {busy ? 'Working…' : 'Suggest a batch'}
          </button>
        </div>
      </form>
      {jobId ? <BatchJob key={jobId} id={jobId} onEnd={batchEnded} /> : null}
      <ErrorBox error={error} />
      {message ? (
        <div className="ok" role="status">
          {message}
        </div>
      ) : null}
      {batch ? (
        <div data-testid="surrogate-batch">
          <p className="muted">
            Gaussian process ({batch.model.kernel}) on {batch.model.observations} trials; noise variance {p4(batch.model.noiseVariance)}; leave-one-out RMSE{' '}
            {p4(batch.model.leaveOneOut.rmse)}
            {unit}, {Math.round(batch.model.leaveOneOut.withinTwoSd * 100)}% of held-out trials within ±2 sd
            {batch.model.leaveOneOut.withinTwoSd < 0.8 ? ' — the surrogate is over-confident; treat its proposals with care' : ''}. Length scales (coded units):{' '}
            {Object.entries(batch.model.lengthScales)
              .map(([k, v]) => `${k} ${p4(v)}`)
              .join(', ')}
            .
          </p>
          <div className="table-wrap">
            <table className="data">
              <thead>
                <tr>
                  <th>Add</th>
                  {Object.keys(batch.suggestions[0]?.values ?? {}).map((k) => (
                    <th key={k}>
                      {k}
                      {units[k] ? ` (${units[k]})` : ''}
                    </th>
                  ))}
                  <th className="num">Predicted</th>
                  <th className="num">P(no failure)</th>
                </tr>
              </thead>
              <tbody>
                {batch.suggestions.map((s) => [
                  <tr key={s.id} className="no-rule">
                    <td>
                      <input
                        type="checkbox"
                        aria-label="Add this trial"
                        checked={chosen.has(s.id)}
                        onChange={(e) => {
                          const next = new Set(chosen);
                          if (e.target.checked) next.add(s.id);
                          else next.delete(s.id);
                          setChosen(next);
                        }}
                      />
                    </td>
                    {Object.values(s.values).map((v, i) => (
                      <td key={i}>{typeof v === 'number' ? p4(v) : v}</td>
                    ))}
                    <td className="num">
                      {p4(s.mean)} ± {p4(s.sd)}
                      {unit}
                    </td>
                    <td className="num">{s.feasibility === undefined ? '—' : s.feasibility.toFixed(2)}</td>
                  </tr>,
                  <tr key={`${s.id}-why`}>
                    <td />
                    <td colSpan={Object.keys(s.values).length + 2} className="reason">
                      {s.reason}
                    </td>
                  </tr>,
                ])}
              </tbody>
            </table>
          </div>
          <p>
            <button type="button" className="btn" onClick={accept} disabled={busy || chosen.size === 0}>
              Add {chosen.size} selected trials to the campaign
            </button>
          </p>
          <h3>The surrogate along each factor, through the first proposal</h3>
          <div className="charts">
            {batch.slices
              .filter((sl) => typeof sl.points[0]?.value === 'number')
              .map((sl) => (
                <BandPlot
                  key={sl.factor}
                  title={`${batch.response}: mean ± 2 sd along ${sl.factor}`}
                  xLabel={`${sl.factor}${units[sl.factor] ? ` (${units[sl.factor]})` : ''}`}
                  yLabel={`${batch.response}${unit}`}
                  points={sl.points.map((p) => ({ x: Number(p.value), mean: p.mean, sd: p.sd }))}
                  marks={best && typeof best.values[sl.factor] === 'number' ? [{ x: Number(best.values[sl.factor]), y: best.mean }] : []}
                />
              ))}
          </div>
          {batch.slices
            .filter((sl) => typeof sl.points[0]?.value !== 'number')
            .map((sl) => (
              <p key={sl.factor}>
                <strong>{sl.factor}</strong>:{' '}
                {sl.points.map((p) => `${p.value} ${p4(p.mean)} ± ${p4(2 * p.sd)}`).join(' · ')}
              </p>
            ))}
        </div>
      ) : null}
    </section>
  );
}
