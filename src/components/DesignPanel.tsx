'use client';
/** Choose a design method and commit the design to the campaign. */
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

const METHODS = [
  ['full-factorial', 'Full factorial'],
  ['central-composite', 'Central composite (face-centred)'],
  ['fractional-factorial', 'Two-level fractional factorial'],
  ['plackett-burman', 'Plackett–Burman screening'],
  ['definitive-screening', 'Definitive screening'],
  ['box-behnken', 'Box–Behnken'],
  ['latin-hypercube', 'Latin hypercube (maximin)'],
  ['sobol', 'Scrambled Sobol points'],
  ['optimal', 'Optimal design (coordinate exchange)'],
] as const;

export function DesignPanel({ campaignId, hasRuns }: { campaignId: string; hasRuns: boolean }) {
  const router = useRouter();
  const [method, setMethod] = useState<string>('full-factorial');
  const [model, setModel] = useState<string>('');
  const [centerPoints, setCenterPoints] = useState('');
  const [runs, setRuns] = useState('');
  const [seed, setSeed] = useState('1');
  const [error, setError] = useState<ApiError | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function generate(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setDone(null);
    const body: Record<string, unknown> = { method };
    if (model) body.model = model;
    if (centerPoints.trim()) body.centerPoints = Number(centerPoints);
    if (runs.trim()) body.runs = Number(runs);
    if (seed.trim()) body.seed = Number(seed);
    setBusy(true);
    const res = await postJson<{ version: number; runs: number; withdrawn: number }>(`/api/v1/campaigns/${campaignId}/designs`, body);
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setDone(`Design version ${res.data.version} committed: ${res.data.runs} runs in randomised order${res.data.withdrawn ? `; ${res.data.withdrawn} untried runs of the earlier design withdrawn` : ''}.`);
    router.refresh();
  }

  return (
    <form className="panel" onSubmit={generate} noValidate>
      <h2 style={{ marginTop: 0 }}>Generate a design</h2>
      <p className="muted">
        Not sure which method fits? <Link href={`/campaigns/${campaignId}/planner`}>Compare candidate designs</Link> side by side before committing one.
      </p>
      <div className="row">
        <div>
          <label htmlFor="d-method">Design method</label>
          <select id="d-method" value={method} onChange={(e) => setMethod(e.target.value)}>
            {METHODS.map(([v, l]) => (
              <option key={v} value={v}>
                {l}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="d-model">Model to support</label>
          <select id="d-model" value={model} onChange={(e) => setModel(e.target.value)}>
            <option value="">method default</option>
            <option value="main-effects">main effects</option>
            <option value="interactions">main effects + two-factor interactions</option>
            <option value="quadratic">full quadratic</option>
          </select>
        </div>
        <div className="narrow">
          <label htmlFor="d-centre">Centre points</label>
          <input id="d-centre" inputMode="numeric" value={centerPoints} onChange={(e) => setCenterPoints(e.target.value)} aria-invalid={error?.field === 'centerPoints' || undefined} />
        </div>
        <div className="narrow">
          <label htmlFor="d-runs">Runs (optimal, space-filling)</label>
          <input id="d-runs" inputMode="numeric" value={runs} onChange={(e) => setRuns(e.target.value)} aria-invalid={error?.field === 'runs' || undefined} />
        </div>
        <div className="narrow">
          <label htmlFor="d-seed">Seed</label>
          <input id="d-seed" inputMode="numeric" value={seed} onChange={(e) => setSeed(e.target.value)} aria-invalid={error?.field === 'seed' || undefined} />
        </div>
      </div>
      {hasRuns ? <p className="muted">Committing a new design withdraws planned runs of earlier designs that were never tried; tried runs stay.</p> : null}
      <ErrorBox error={error} />
      {done ? <div className="ok" role="status">{done}</div> : null}
      <button type="submit" className="btn" disabled={busy}>
        {busy ? 'Generating…' : 'Generate and commit design'}
      </button>
    </form>
  );
}
