'use client';
/**
 * The rig log on a tablet: the rig's queue in planned order, start a trial, enter readings with units,
 * finish. Large touch targets; every refusal names the field and the fix.
 */
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

export interface QueueItem {
  runId: string;
  runNumber: number;
  values: Record<string, string | number>;
  start: string | null;
  state: string;
  trialId: string | null;
}

export interface RigLogProps {
  campaignId: string;
  rigId: string;
  timeZone: string;
  responses: { name: string; unit?: string; goal: string }[];
  robots: { id: string; name: string; massGrams: number }[];
  queue: QueueItem[];
}

function newKey(): string {
  return typeof crypto !== 'undefined' && 'randomUUID' in crypto ? crypto.randomUUID() : `k-${Date.now()}-${Math.random().toString(36).slice(2)}`;
}

function fmtValues(v: Record<string, string | number>): string {
  return Object.entries(v)
    .map(([k, x]) => `${k} ${typeof x === 'number' ? Number(x.toPrecision(4)) : x}`)
    .join(' · ');
}

export function RigLog({ campaignId, rigId, timeZone, responses, robots, queue }: RigLogProps) {
  const router = useRouter();
  const running = queue.find((q) => q.state === 'running' && q.trialId);
  const [active, setActive] = useState<{ trialId: string; runNumber: number } | null>(running ? { trialId: running.trialId!, runNumber: running.runNumber } : null);
  const [robotId, setRobotId] = useState(robots[0]?.id ?? '');
  const [operator, setOperator] = useState('');
  const [readings, setReadings] = useState<Record<string, string>>({});
  const [outcome, setOutcome] = useState<'passed' | 'failed'>('passed');
  const [failureReason, setFailureReason] = useState('');
  const [notes, setNotes] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [warnings, setWarnings] = useState<{ field: string; message: string }[]>([]);
  const [busy, setBusy] = useState(false);

  async function start(item: QueueItem) {
    setError(null);
    setMessage(null);
    setBusy(true);
    const res = await postJson<{ trial: { id: string } }>(
      `/api/v1/campaigns/${campaignId}/trials`,
      { runId: item.runId, rigId, robotId: robotId || undefined, operator },
      { 'Idempotency-Key': newKey() },
    );
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setActive({ trialId: res.data.trial.id, runNumber: item.runNumber });
    setReadings({});
    setOutcome('passed');
    setFailureReason('');
    setNotes('');
    setWarnings([]);
    router.refresh();
  }

  async function finish(e: React.FormEvent) {
    e.preventDefault();
    if (!active) return;
    setError(null);
    const observations: Record<string, number> = {};
    for (const r of responses) {
      const raw = (readings[r.name] ?? '').trim().replace(',', '.');
      if (raw === '') continue;
      const n = Number(raw);
      if (!Number.isFinite(n)) {
        setError({ code: 'invalid_input', field: `observations.${r.name}`, message: `${r.name} must be a number${r.unit ? ` in ${r.unit}` : ''}` });
        return;
      }
      observations[r.name] = n;
    }
    setBusy(true);
    const res = await postJson<{ warnings: { field: string; message: string }[] }>(`/api/v1/campaigns/${campaignId}/trials/${active.trialId}/finish`, {
      observations,
      status: outcome === 'failed' ? 'failed' : 'done',
      passed: outcome === 'passed',
      failureReason,
      notes,
    });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setWarnings(res.data.warnings ?? []);
    setMessage(`Run ${active.runNumber} logged.`);
    setActive(null);
    router.refresh();
  }

  const waiting = queue.filter((q) => q.state === 'scheduled' || q.state === 'planned');
  const clock = (iso: string) => new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', hour: '2-digit', minute: '2-digit' }).format(new Date(iso));

  return (
    <div className="rig">
      <div className="panel">
        <div className="row">
          <div>
            <label htmlFor="rig-robot">Robot</label>
            <select id="rig-robot" value={robotId} onChange={(e) => setRobotId(e.target.value)}>
              <option value="">(not recorded)</option>
              {robots.map((r) => (
                <option key={r.id} value={r.id}>
                  {r.name} ({r.massGrams} g)
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor="rig-operator">Operator</label>
            <input id="rig-operator" value={operator} onChange={(e) => setOperator(e.target.value)} autoComplete="name" />
          </div>
        </div>
      </div>
      <ErrorBox error={error} />
      {message ? (
        <div className="ok" role="status">
          {message}
        </div>
      ) : null}
      {warnings.map((w, i) => (
        <div className="warning" key={i} role="status">
          <strong>{w.field}: </strong>
          {w.message}
        </div>
      ))}
      {active ? (
        <form className="panel current-trial" onSubmit={finish} noValidate>
          <h2 style={{ marginTop: 0 }}>Run {active.runNumber} — trial in progress</h2>
          <div className="row">
            {responses.map((r) => (
              <div key={r.name}>
                <label htmlFor={`obs-${r.name}`}>
                  {r.name} <span className="unit">{r.unit ? `(${r.unit})` : ''}</span>
                </label>
                <input
                  id={`obs-${r.name}`}
                  inputMode="decimal"
                  value={readings[r.name] ?? ''}
                  onChange={(e) => setReadings({ ...readings, [r.name]: e.target.value })}
                  aria-invalid={error?.field === `observations.${r.name}` || undefined}
                />
              </div>
            ))}
          </div>
          <div className="row" style={{ marginTop: '0.6rem' }}>
            <div>
              <label htmlFor="rig-outcome">Outcome</label>
              <select id="rig-outcome" value={outcome} onChange={(e) => setOutcome(e.target.value as 'passed' | 'failed')}>
                <option value="passed">completed the hop sequence</option>
                <option value="failed">failed (fell, broke, stalled)</option>
              </select>
            </div>
            {outcome === 'failed' ? (
              <div>
                <label htmlFor="rig-reason">Failure reason</label>
                <input id="rig-reason" value={failureReason} onChange={(e) => setFailureReason(e.target.value)} aria-invalid={error?.field === 'failureReason' || undefined} />
              </div>
            ) : null}
          </div>
          <label htmlFor="rig-notes" style={{ marginTop: '0.6rem' }}>
            Notes
          </label>
          <textarea id="rig-notes" rows={2} value={notes} onChange={(e) => setNotes(e.target.value)} />
          <p>
            <button type="submit" className="btn" disabled={busy}>
              Finish trial
            </button>
          </p>
        </form>
      ) : null}
      <section className="panel">
        <h2 style={{ marginTop: 0 }}>Queue</h2>
        {waiting.length === 0 ? <p className="muted">Nothing waiting on this rig. Place runs on the week plan.</p> : null}
        <ul className="queue" data-testid="rig-queue">
          {waiting.map((q, i) => (
            <li key={q.runId}>
              <div className="row">
                <div>
                  <strong>Run {q.runNumber}</strong> {q.start ? <span className="muted">{clock(q.start)}</span> : null}
                  <br />
                  {fmtValues(q.values)}
                </div>
                <div className="narrow" style={{ flexBasis: 180 }}>
                  <button type="button" className={i === 0 ? 'btn' : 'btn secondary'} disabled={busy || !!active} onClick={() => start(q)} aria-label={`Start run ${q.runNumber}`}>
                    Start trial
                  </button>
                </div>
              </div>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
