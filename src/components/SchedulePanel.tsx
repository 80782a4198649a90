'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

interface Result {
  assignments: unknown[];
  changeovers: number;
  makespanMinutes: number;
  unscheduled: { runId: string; reason: string }[];
  notes?: string[];
  infeasibility?: { message: string }[];
}

export function SchedulePanel({ campaignId, defaultStart }: { campaignId: string; defaultStart: string }) {
  const router = useRouter();
  const [startDate, setStartDate] = useState(defaultStart);
  const [days, setDays] = useState('5');
  const [error, setError] = useState<ApiError | null>(null);
  const [result, setResult] = useState<Result | null>(null);
  const [busy, setBusy] = useState(false);

  async function place(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setBusy(true);
    const res = await postJson<Result>(`/api/v1/campaigns/${campaignId}/schedule`, { startDate, days: Number(days) });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setResult(res.data);
    router.refresh();
  }

  return (
    <form className="panel" onSubmit={place} noValidate>
      <h2 style={{ marginTop: 0 }}>Place open runs on the rigs</h2>
      <p className="muted">Runs go onto each rig&apos;s working hours in their randomised order; surface changes add their changeover time.</p>
      <div className="row">
        <div className="narrow" style={{ flexBasis: 180 }}>
          <label htmlFor="s-start">First day</label>
          <input id="s-start" type="date" value={startDate} onChange={(e) => setStartDate(e.target.value)} aria-invalid={error?.field === 'startDate' || undefined} />
        </div>
        <div className="narrow">
          <label htmlFor="s-days">Days</label>
          <input id="s-days" inputMode="numeric" value={days} onChange={(e) => setDays(e.target.value)} aria-invalid={error?.field === 'days' || undefined} />
        </div>
        <div>
          <button type="submit" className="btn" disabled={busy}>
            {busy ? 'Placing…' : 'Place runs'}
          </button>
        </div>
      </div>
      <ErrorBox error={error} />
      {result ? (
        <div className={result.unscheduled.length ? 'warning' : 'ok'} role="status">
          Placed {result.assignments.length} runs with {result.changeovers} changeovers; the plan spans {Math.round(result.makespanMinutes)} minutes.
          {result.unscheduled.length ? ` ${result.unscheduled.length} runs did not fit: ${result.unscheduled[0]!.reason}` : ''}
          {result.infeasibility?.length ? ` ${result.infeasibility.map((i) => i.message).join(' ')}` : ''}
        </div>
      ) : null}
    </form>
  );
}
