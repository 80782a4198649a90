'use client';
/** Choose a design method and commit the design to the campaign. */
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { blockGeneratorWords, showsBlockGenerators } from './block-generators';
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

export { blockGeneratorWords, showsBlockGenerators };

/** Methods that take a number of blocks. */
const BLOCKED = ['full-factorial', 'fractional-factorial', 'central-composite', 'optimal'];

export interface DesignForm {
  method: string;
  model: string;
  centerPoints: string;
  runs: string;
  seed: string;
  blocks: string;
  blockGenerators: string;
}

/** The campaign design request of the form: only the fields filled in (and shown), as numbers. */
export function designBody(f: DesignForm): Record<string, unknown> {
  const body: Record<string, unknown> = { method: f.method };
  if (f.model) body.model = f.model;
  if (f.centerPoints.trim()) body.centerPoints = Number(f.centerPoints);
  if (f.runs.trim()) body.runs = Number(f.runs);
  if (f.seed.trim()) body.seed = Number(f.seed);
  if (BLOCKED.includes(f.method) && f.blocks.trim()) body.blocks = Number(f.blocks);
  const words = blockGeneratorWords(f.blockGenerators);
  if (showsBlockGenerators(f) && words.length) body.blockGenerators = words;
  return body;
}

export function DesignPanel({ campaignId, hasRuns }: { campaignId: string; hasRuns: boolean }) {
  const router = useRouter();
  const [method, setMethod] = useState<string>('full-factorial');
  const [model, setModel] = useState<string>('');
  const [centerPoints, setCenterPoints] = useState('');
  const [runs, setRuns] = useState('');
  const [seed, setSeed] = useState('1');
  const [blocks, setBlocks] = useState('');
  const [blockGenerators, setBlockGenerators] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const takesBlocks = BLOCKED.includes(method);
  const showGenerators = showsBlockGenerators({ method, blocks, blockGenerators });
  const generatorError = error?.field?.startsWith('blockGenerators') ? error : null;

  async function generate(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setDone(null);
    const body = designBody({ method, model, centerPoints, runs, seed, blocks, blockGenerators });
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
        {takesBlocks ? (
          <div className="narrow">
            <label htmlFor="d-blocks">Blocks</label>
            <input id="d-blocks" inputMode="numeric" placeholder="1" value={blocks} onChange={(e) => setBlocks(e.target.value)} aria-invalid={error?.field === 'blocks' || undefined} />
          </div>
        ) : null}
      </div>
      {showGenerators ? (
        <div>
          <label htmlFor="d-blockgen">Block generators (optional)</label>
          <input
            id="d-blockgen"
            placeholder="e.g. ABC, CDE (empty: chosen for you)"
            value={blockGenerators}
            onChange={(e) => setBlockGenerators(e.target.value)}
            aria-invalid={generatorError ? true : undefined}
            aria-describedby="d-blockgen-help"
          />
          <p id="d-blockgen-help" className="muted" style={{ margin: '0.2rem 0 0', fontSize: '0.85rem' }}>
            Interactions to confound with blocks, in factor letters A, B, C … (no I) in the order of the factors, or names joined by *, separated by commas. n words give 2^n blocks;
            every product of them is confounded with blocks too.
          </p>
          {generatorError ? <ErrorBox error={generatorError} /> : null}
        </div>
      ) : null}
      {hasRuns ? <p className="muted">Committing a new design withdraws planned runs of earlier designs that were never tried; tried runs stay.</p> : null}
      <ErrorBox error={generatorError && showGenerators ? null : error} />
      {done ? <div className="ok" role="status">{done}</div> : null}
      <button type="submit" className="btn" disabled={busy}>
        {busy ? 'Generating…' : 'Generate and commit design'}
      </button>
    </form>
  );
}
