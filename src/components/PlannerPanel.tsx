'use client';
/** Compare two or three candidate designs side by side (previews, nothing stored) and commit one. */
import { usePathname, useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { blockGeneratorWords, showsBlockGenerators } from './block-generators';
import { ErrorBox } from './FieldError';
import { JobProgress, useJob, type JobState } from './JobProgress';
import { CorrelationMap, FdsChart } from './plan-charts';

const METHODS = [
  ['full-factorial', 'Full factorial'],
  ['central-composite', 'Central composite'],
  ['fractional-factorial', 'Two-level fractional factorial'],
  ['plackett-burman', 'Plackett–Burman screening'],
  ['definitive-screening', 'Definitive screening'],
  ['box-behnken', 'Box–Behnken'],
  ['latin-hypercube', 'Latin hypercube (maximin)'],
  ['sobol', 'Scrambled Sobol points'],
  ['optimal', 'Optimal design (coordinate exchange)'],
] as const;

const NAMES = ['A', 'B', 'C'] as const;
const COLOURS = ['#1f6f5c', '#b5541c', '#4a2a7a'];

export interface CandidateSpec {
  method: string;
  model: string;
  runs: string;
  centerPoints: string;
  wholePlots: string;
  criterion: string;
  seed: string;
  /** Optimal designs: random starts of the search (empty: the engine's default). */
  starts?: string;
  /** Blocks (empty: none). */
  blocks?: string;
  /** Optimal designs: 'random' treats blocks as random effects (empty: fixed). */
  blockEffects?: string;
  /** Two-level designs: the block generators chosen by the engineer ("ABC, CDE"; empty: searched). */
  blockGenerators?: string;
}

interface Diagnostics {
  runs: number;
  parameters: number;
  errorDegreesOfFreedom: number;
  dEfficiency: number;
  aEfficiency: number;
  iEfficiency: number;
  gEfficiency: number;
  averagePredictionVariance: number;
  maxPredictionVariance: number;
  maxVif: number;
  correlation: { labels: string[]; values: number[][] };
  fractionOfDesignSpace: { fraction: number[]; scaledPredictionVariance: number[] };
  power?: { term: string; power: number }[];
  notes: string[];
  optimal?: { startsCompleted: number; stopped: boolean };
  blocking?: { blocks: number; generators: string[]; confounded: { effect: string; aliases: string[] }[]; orthogonal: boolean; maxBlockCorrelation: number };
}

interface Preview {
  method: string;
  model: string;
  runs: { wholePlot?: number }[];
  diagnostics: Diagnostics;
}

/** The JSON body the design endpoint takes for a candidate's form fields (empty fields left out). */
export function candidateBody(c: CandidateSpec): Record<string, unknown> {
  const body: Record<string, unknown> = { method: c.method };
  if (c.model) body.model = c.model;
  const num = (k: keyof CandidateSpec, name: string) => {
    if ((c[k] ?? '').trim()) body[name] = Number(c[k]);
  };
  num('runs', 'runs');
  num('centerPoints', 'centerPoints');
  num('wholePlots', 'wholePlots');
  num('seed', 'seed');
  num('blocks', 'blocks');
  const words = blockGeneratorWords(c.blockGenerators ?? '');
  if (words.length && showsBlockGenerators({ method: c.method, blocks: c.blocks ?? '', blockGenerators: c.blockGenerators ?? '' })) body.blockGenerators = words;
  if (c.method === 'optimal' && c.blockEffects === 'random' && c.blocks?.trim()) body.blockEffects = 'random';
  if (c.method === 'optimal' && c.starts?.trim()) body.starts = Number(c.starts);
  if (c.criterion) body.criterion = c.criterion;
  return body;
}

const pct = (v: number) => `${(v * 100).toFixed(1)}%`;

/** One candidate's design search, run as a job: polled until it ends, then handed to the panel. */
function CandidateSearch({ id, name, onEnd }: { id: string; name: string; onEnd: (job: JobState<Preview>) => void }) {
  const { job, error } = useJob<Preview>(id, onEnd);
  return <JobProgress job={job} error={error} label={`Candidate ${name} search`} />;
}

export function PlannerPanel({
  campaignId,
  defaults,
  hasRuns,
  initialJobs = [],
}: {
  campaignId: string;
  defaults: CandidateSpec[];
  hasRuns: boolean;
  /** Job ids of candidate searches (from the page's URL), by candidate position; '' for none. */
  initialJobs?: string[];
}) {
  const router = useRouter();
  const pathname = usePathname();
  const [specs, setSpecs] = useState<CandidateSpec[]>(defaults);
  const [previews, setPreviews] = useState<(Preview | null)[]>([]);
  const [errors, setErrors] = useState<(ApiError | null)[]>([]);
  const [jobs, setJobs] = useState<string[]>(initialJobs);
  const [running, setRunning] = useState<Set<string>>(new Set(initialJobs.filter(Boolean)));
  const [fromJob, setFromJob] = useState<(string | null)[]>([]);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState<string | null>(null);
  const [commitError, setCommitError] = useState<ApiError | null>(null);

  const update = (i: number, patch: Partial<CandidateSpec>) => setSpecs((s) => s.map((c, k) => (k === i ? { ...c, ...patch } : c)));

  async function compare(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setDone(null);
    const out: (Preview | null)[] = [];
    const errs: (ApiError | null)[] = [];
    const ids: string[] = [];
    // One at a time: a construction is previewed at once; an optimal-design search becomes a job
    // with progress and cancel, whose result arrives when it ends.
    for (const spec of specs) {
      if (spec.method === 'optimal') {
        const res = await postJson<{ id: string }>('/api/v1/jobs', { kind: 'design-search', campaignId, input: candidateBody(spec) });
        out.push(null);
        // The job's body wraps the candidate in "input"; the form's fields are named without it.
        errs.push(res.ok ? null : { ...res.error, field: res.error.field?.replace(/^input\./, '') ?? null });
        ids.push(res.ok ? res.data.id : '');
        continue;
      }
      const res = await postJson<Preview>(`/api/v1/campaigns/${campaignId}/designs?preview=1`, candidateBody(spec));
      out.push(res.ok ? res.data : null);
      errs.push(res.ok ? null : res.error);
      ids.push('');
    }
    setPreviews(out);
    setErrors(errs);
    setJobs(ids);
    setFromJob([]);
    setRunning(new Set(ids.filter(Boolean)));
    // The job ids go into the URL: leaving the page and coming back finds the searches again.
    router.replace(ids.some(Boolean) ? `${pathname}?jobs=${ids.join(',')}` : pathname, { scroll: false });
    setBusy(false);
  }

  function searchEnded(i: number, job: JobState<Preview>) {
    setRunning((r) => {
      const next = new Set(r);
      next.delete(job.id);
      return next;
    });
    if (job.result) {
      const result = job.result;
      setPreviews((p) => {
        const next = p.slice();
        while (next.length <= i) next.push(null);
        next[i] = result;
        return next;
      });
      setFromJob((f) => {
        const next = f.slice();
        while (next.length <= i) next.push(null);
        next[i] = job.id;
        return next;
      });
    }
  }

  async function commit(i: number) {
    setCommitError(null);
    setDone(null);
    setBusy(true);
    // A searched candidate is committed as found (no second search); a construction is built again.
    const job = fromJob[i];
    const res = job
      ? await postJson<{ version: number; runs: number; withdrawn: number }>(`/api/v1/campaigns/${campaignId}/designs?fromJob=${encodeURIComponent(job)}`, {})
      : await postJson<{ version: number; runs: number; withdrawn: number }>(`/api/v1/campaigns/${campaignId}/designs`, candidateBody(specs[i]!));
    setBusy(false);
    if (!res.ok) return setCommitError(res.error);
    setDone(`Candidate ${NAMES[i]} committed as design version ${res.data.version}: ${res.data.runs} runs${res.data.withdrawn ? `; ${res.data.withdrawn} untried runs of the earlier design withdrawn` : ''}.`);
    router.refresh();
  }

  const shown = previews.map((p, i) => (p ? { p, i } : null)).filter((x): x is { p: Preview; i: number } => x !== null);
  const rows: [string, (d: Diagnostics, p: Preview) => string][] = [
    ['Runs', (d) => String(d.runs)],
    ['Search', (d) => (d.optimal ? `${d.optimal.startsCompleted} random starts${d.optimal.stopped ? ' (cancelled: best design so far)' : ''}` : '—')],
    ['Blocks', (d) => (d.blocking ? `${d.blocking.blocks}${d.blocking.orthogonal ? ', orthogonal to the model' : `, |r| with the model up to ${d.blocking.maxBlockCorrelation.toFixed(2)}`}` : '—')],
    ['Confounded with blocks', (d) => (d.blocking?.confounded.length ? d.blocking.confounded.map((c) => [c.effect, ...c.aliases].join(' = ')).join('; ') : '—')],
    ['Whole plots', (_d, p) => String(new Set(p.runs.map((r) => r.wholePlot).filter((w) => w !== undefined && w !== null)).size || '—')],
    ['Parameters', (d) => String(d.parameters)],
    ['Error df', (d) => String(d.errorDegreesOfFreedom)],
    ['D-efficiency', (d) => pct(d.dEfficiency)],
    ['A-efficiency', (d) => pct(d.aEfficiency)],
    ['I-efficiency', (d) => pct(d.iEfficiency)],
    ['G-efficiency', (d) => pct(d.gEfficiency)],
    ['Average prediction variance', (d) => d.averagePredictionVariance.toFixed(3)],
    ['Largest prediction variance', (d) => d.maxPredictionVariance.toFixed(3)],
    ['Largest VIF', (d) => d.maxVif.toFixed(2)],
    ['Lowest term power', (d) => (d.power?.length ? pct(Math.min(...d.power.map((t) => t.power))) : '—')],
  ];
  const powerTerms = [...new Set(shown.flatMap(({ p }) => (p.diagnostics.power ?? []).map((t) => t.term)))];

  return (
    <>
      <form className="panel" onSubmit={compare} noValidate>
        <h2 style={{ marginTop: 0 }}>Candidate designs</h2>
        <p className="muted">Each candidate is computed without being stored. Compare them, then commit one to the campaign.</p>
        <div className="grid3">
          {specs.map((c, i) => {
            const n = NAMES[i]!;
            const err = errors[i];
            return (
              <fieldset key={n} className="candidate" style={{ borderColor: COLOURS[i] }}>
                <legend>Candidate {n}</legend>
                <label htmlFor={`c${n}-method`}>Candidate {n} method</label>
                <select id={`c${n}-method`} value={c.method} onChange={(e) => update(i, { method: e.target.value })}>
                  {METHODS.map(([v, l]) => (
                    <option key={v} value={v}>
                      {l}
                    </option>
                  ))}
                </select>
                <label htmlFor={`c${n}-model`}>Candidate {n} model</label>
                <select id={`c${n}-model`} value={c.model} onChange={(e) => update(i, { model: e.target.value })}>
                  <option value="">method default</option>
                  <option value="main-effects">main effects</option>
                  <option value="interactions">main effects + two-factor interactions</option>
                  <option value="quadratic">full quadratic</option>
                </select>
                <div className="row">
                  <div>
                    <label htmlFor={`c${n}-runs`}>Candidate {n} runs</label>
                    <input id={`c${n}-runs`} inputMode="numeric" value={c.runs} onChange={(e) => update(i, { runs: e.target.value })} aria-invalid={err?.field === 'runs' || undefined} />
                  </div>
                  <div>
                    <label htmlFor={`c${n}-centre`}>Candidate {n} centre points</label>
                    <input id={`c${n}-centre`} inputMode="numeric" value={c.centerPoints} onChange={(e) => update(i, { centerPoints: e.target.value })} aria-invalid={err?.field === 'centerPoints' || undefined} />
                  </div>
                </div>
                <div className="row">
                  <div>
                    <label htmlFor={`c${n}-wp`}>Candidate {n} whole plots</label>
                    <input id={`c${n}-wp`} inputMode="numeric" value={c.wholePlots} onChange={(e) => update(i, { wholePlots: e.target.value })} aria-invalid={err?.field === 'wholePlots' || undefined} />
                  </div>
                  <div>
                    <label htmlFor={`c${n}-blocks`}>Candidate {n} blocks</label>
                    <input id={`c${n}-blocks`} inputMode="numeric" value={c.blocks ?? ''} onChange={(e) => update(i, { blocks: e.target.value })} aria-invalid={err?.field === 'blocks' || err?.field === 'input.blocks' || undefined} />
                  </div>
                  {showsBlockGenerators({ method: c.method, blocks: c.blocks ?? '', blockGenerators: c.blockGenerators ?? '' }) ? (
                    <div>
                      <label htmlFor={`c${n}-bgen`}>Candidate {n} block generators</label>
                      <input
                        id={`c${n}-bgen`}
                        placeholder="searched, or e.g. ABC, CDE"
                        value={c.blockGenerators ?? ''}
                        onChange={(e) => update(i, { blockGenerators: e.target.value })}
                        aria-invalid={err?.field?.startsWith('blockGenerators') || err?.field?.startsWith('input.blockGenerators') || undefined}
                      />
                    </div>
                  ) : null}
                  <div>
                    <label htmlFor={`c${n}-crit`}>Candidate {n} criterion</label>
                    <select id={`c${n}-crit`} value={c.criterion} onChange={(e) => update(i, { criterion: e.target.value })}>
                      <option value="">default (D)</option>
                      <option value="D">D (precise effects)</option>
                      <option value="I">I (precise predictions)</option>
                    </select>
                  </div>
                  <div>
                    <label htmlFor={`c${n}-seed`}>Candidate {n} seed</label>
                    <input id={`c${n}-seed`} inputMode="numeric" value={c.seed} onChange={(e) => update(i, { seed: e.target.value })} aria-invalid={err?.field === 'seed' || undefined} />
                  </div>
                </div>
                {c.method === 'optimal' ? (
                  <div className="row">
                    <div>
                      <label htmlFor={`c${n}-starts`}>Candidate {n} random starts</label>
                      <input id={`c${n}-starts`} inputMode="numeric" placeholder="20" value={c.starts ?? ''} onChange={(e) => update(i, { starts: e.target.value })} aria-invalid={err?.field === 'input.starts' || err?.field === 'starts' || undefined} />
                    </div>
                    <div>
                      <label htmlFor={`c${n}-beff`}>Candidate {n} block effects</label>
                      <select id={`c${n}-beff`} value={c.blockEffects ?? ''} onChange={(e) => update(i, { blockEffects: e.target.value })}>
                        <option value="">fixed</option>
                        <option value="random">random (variance ratio 1)</option>
                      </select>
                    </div>
                  </div>
                ) : null}
                {jobs[i] ? <CandidateSearch key={jobs[i]} id={jobs[i]!} name={n} onEnd={(job) => searchEnded(i, job)} /> : null}
                <ErrorBox error={err ?? null} />
                {specs.length > 2 ? (
                  <button type="button" className="btn secondary" onClick={() => { setSpecs((s) => s.filter((_, k) => k !== i)); setPreviews([]); setErrors([]); }}>
                    Remove candidate {n}
                  </button>
                ) : null}
              </fieldset>
            );
          })}
        </div>
        <div className="row" style={{ marginTop: '0.6rem' }}>
          <div style={{ flex: '0 0 auto' }}>
            <button type="submit" className="btn" disabled={busy || running.size > 0}>
              {busy ? 'Computing…' : running.size > 0 ? 'Searching…' : 'Compare candidates'}
            </button>
          </div>
          {specs.length < 3 ? (
            <div style={{ flex: '0 0 auto' }}>
              <button type="button" className="btn secondary" onClick={() => setSpecs((s) => [...s, { ...s[s.length - 1]!, seed: String(Number(s[s.length - 1]!.seed || '1') + 1) }])}>
                Add a third candidate
              </button>
            </div>
          ) : null}
        </div>
      </form>

      {shown.length ? (
        <section className="panel" data-testid="comparison">
          <h2 style={{ marginTop: 0 }}>Side by side</h2>
          {hasRuns ? <p className="muted">Committing withdraws planned runs of earlier designs that were never tried; tried runs stay.</p> : null}
          <div className="table-wrap">
            <table className="data" data-testid="comparison-table">
              <thead>
                <tr>
                  <th>Property</th>
                  {shown.map(({ p, i }) => (
                    <th key={i} className="num" style={{ color: COLOURS[i] }}>
                      {NAMES[i]}: {p.method}, {p.model}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {rows.map(([label, f]) => (
                  <tr key={label}>
                    <th scope="row">{label}</th>
                    {shown.map(({ p, i }) => (
                      <td key={i} className="num">
                        {f(p.diagnostics, p)}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <ErrorBox error={commitError} />
          {done ? (
            <div className="ok" role="status">
              {done}
            </div>
          ) : null}
          <div className="row">
            {shown.map(({ i }) => (
              <div key={i} style={{ flex: '0 0 auto' }}>
                <button type="button" className="btn" disabled={busy} onClick={() => commit(i)}>
                  Commit candidate {NAMES[i]}
                </button>
              </div>
            ))}
          </div>

          <h3>Prediction variance over the design space</h3>
          <FdsChart
            series={shown.map(({ p, i }) => ({
              name: `Candidate ${NAMES[i]}`,
              colour: COLOURS[i]!,
              fraction: p.diagnostics.fractionOfDesignSpace.fraction,
              variance: p.diagnostics.fractionOfDesignSpace.scaledPredictionVariance,
            }))}
          />

          <h3>Correlation between model columns</h3>
          <div className="grid3">
            {shown.map(({ p, i }) => (
              <div key={i}>
                <strong>Candidate {NAMES[i]}</strong>
                <CorrelationMap title={`Candidate ${NAMES[i]}: |r| between model columns`} labels={p.diagnostics.correlation.labels} values={p.diagnostics.correlation.values} />
              </div>
            ))}
          </div>

          {powerTerms.length ? (
            <>
              <h3>Power of each term</h3>
              <p className="muted">Chance of detecting a change of 2σ from low to high at α = 0.05.</p>
              <div className="table-wrap">
                <table className="data" data-testid="power-table">
                  <thead>
                    <tr>
                      <th>Term</th>
                      {shown.map(({ i }) => (
                        <th key={i} className="num">
                          {NAMES[i]}
                        </th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {powerTerms.map((term) => (
                      <tr key={term}>
                        <td>{term}</td>
                        {shown.map(({ p, i }) => {
                          const t = p.diagnostics.power?.find((x) => x.term === term);
                          return (
                            <td key={i} className="num">
                              {t ? pct(t.power) : '—'}
                            </td>
                          );
                        })}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </>
          ) : null}
          {shown.some(({ p }) => p.diagnostics.notes.length) ? (
            <ul>
              {shown.flatMap(({ p, i }) => p.diagnostics.notes.map((note, k) => <li key={`${i}-${k}`}>Candidate {NAMES[i]}: {note}</li>))}
            </ul>
          ) : null}
        </section>
      ) : null}
    </>
  );
}
