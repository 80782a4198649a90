'use client';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { AnalysisView, type AnalysisViewData } from './AnalysisView';
import { ErrorBox } from './FieldError';
import { useMay } from './role-context';

export function AnalysisPanel({ campaignId, responses, initial }: { campaignId: string; responses: string[]; initial: AnalysisViewData | null }) {
  const [response, setResponse] = useState(initial?.response ?? responses[0] ?? '');
  const [model, setModel] = useState(initial?.model ?? 'main-effects');
  const [data, setData] = useState<AnalysisViewData | null>(initial);
  const [error, setError] = useState<ApiError | null>(null);
  const [busy, setBusy] = useState(false);
  const canFit = useMay('plan');

  async function fit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setBusy(true);
    const res = await postJson<AnalysisViewData>(`/api/v1/campaigns/${campaignId}/analyses`, { response, model });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setData(res.data);
  }

  return (
    <>
      {canFit ? (
      <form className="panel" onSubmit={fit} noValidate>
        <div className="row">
          <div>
            <label htmlFor="a-response">Response</label>
            <select id="a-response" value={response} onChange={(e) => setResponse(e.target.value)}>
              {responses.map((r) => (
                <option key={r} value={r}>
                  {r}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor="a-model">Model</label>
            <select id="a-model" value={model} onChange={(e) => setModel(e.target.value)}>
              <option value="main-effects">first order (main effects)</option>
              <option value="interactions">first order + two-factor interactions</option>
              <option value="quadratic">full quadratic</option>
            </select>
          </div>
          <div>
            <button type="submit" className="btn" disabled={busy}>
              {busy ? 'Fitting…' : 'Fit model'}
            </button>
          </div>
        </div>
        <ErrorBox error={error} />
      </form>
      ) : null}
      {data ? <AnalysisView data={data} /> : <p className="muted">{canFit ? 'Fit a model to see its coefficients and ANOVA table.' : 'No model has been fitted yet; a planner fits one.'}</p>}
    </>
  );
}
