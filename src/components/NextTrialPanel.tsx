'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

interface Proposal {
  id: string;
  values: Record<string, string | number>;
  reason: string;
  model: string;
}

export function NextTrialPanel({ campaignId, units }: { campaignId: string; units: Record<string, string> }) {
  const router = useRouter();
  const [model, setModel] = useState('quadratic');
  const [proposal, setProposal] = useState<Proposal | null>(null);
  const [error, setError] = useState<ApiError | null>(null);
  const [accepted, setAccepted] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function propose(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setAccepted(null);
    setBusy(true);
    const res = await postJson<Proposal>(`/api/v1/campaigns/${campaignId}/next-trials`, { model });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setProposal(res.data);
    router.refresh();
  }

  async function accept() {
    if (!proposal) return;
    setError(null);
    setBusy(true);
    const res = await postJson<{ run: { runNumber: number } }>(`/api/v1/campaigns/${campaignId}/suggestions/${proposal.id}/accept`, {});
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setAccepted(`Added to the campaign as run ${res.data.run.runNumber}. Place it on the week plan to schedule it.`);
    setProposal(null);
    router.refresh();
  }

  return (
    <section className="panel">
      <form onSubmit={propose} noValidate className="row">
        <div>
          <label htmlFor="n-model">Model the next trial should inform</label>
          <select id="n-model" value={model} onChange={(e) => setModel(e.target.value)}>
            <option value="main-effects">first order</option>
            <option value="interactions">first order + interactions</option>
            <option value="quadratic">full quadratic</option>
          </select>
        </div>
        <div>
          <button type="submit" className="btn" disabled={busy}>
            Propose next trial
          </button>
        </div>
      </form>
      <ErrorBox error={error} />
      {proposal ? (
        <div className="panel current-trial" data-testid="proposal">
          <h3 style={{ marginTop: 0 }}>Proposed trial</h3>
          <dl className="facts">
            {Object.entries(proposal.values).map(([k, v]) => (
              <div key={k} style={{ display: 'contents' }}>
                <dt>{k}</dt>
                <dd>
                  {typeof v === 'number' ? Number(v.toPrecision(4)) : v} {units[k] ?? ''}
                </dd>
              </div>
            ))}
          </dl>
          <p>{proposal.reason}</p>
          <button type="button" className="btn" onClick={accept} disabled={busy}>
            Add to campaign as a new run
          </button>
        </div>
      ) : null}
      {accepted ? (
        <div className="ok" role="status">
          {accepted}
        </div>
      ) : null}
    </section>
  );
}
