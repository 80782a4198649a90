'use client';
/**
 * Trials logged on this rig: each reading with where it came from (typed, track, import), corrections
 * as amendments with a reason (the original shown struck through beside the new value), and the motion
 * track upload that turns a track into per-hop metrics.
 */
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';
import { useMay } from './role-context';
import { TrackUpload } from './TrackUpload';
import type { RigTrialView } from '@/server/repos/rig-log';

/** A logged trial as the rig page lists it (the shape the server's rig log answers). */
export type RigTrialItem = RigTrialView;

/** The value a field had before its first amendment, when it was amended. */
function originalOf(trial: RigTrialItem, field: string): string | null {
  const first = trial.amendments.find((a) => a.field === field);
  return first ? first.oldValue : null;
}

/** A stored number for display: at most 6 significant digits (the database keeps full precision). */
function shown(value: string): string {
  const n = Number(value);
  return value.trim() !== '' && Number.isFinite(n) ? String(Number(n.toPrecision(6))) : value;
}

function Corrected({ trial, field, current: raw }: { trial: RigTrialItem; field: string; current: string }) {
  const current = shown(raw);
  const stored = originalOf(trial, field);
  const original = stored === null ? null : shown(stored);
  if (original === null || original === current) return <>{current || '—'}</>;
  const reasons = trial.amendments.filter((a) => a.field === field).map((a) => a.reason);
  return (
    <span title={`corrected: ${reasons.join('; ')}`}>
      <del aria-label={`original ${original}`}>{original}</del> <ins style={{ textDecoration: 'none', fontWeight: 600 }}>{current}</ins>
    </span>
  );
}

function AmendForm({ campaignId, trial, onDone }: { campaignId: string; trial: RigTrialItem; onDone: () => void }) {
  const router = useRouter();
  const fields = [...trial.observations.map((o) => o.name), 'notes', 'failureReason', 'passed'];
  const [field, setField] = useState(fields[0] ?? 'notes');
  const [value, setValue] = useState('');
  const [reason, setReason] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const [busy, setBusy] = useState(false);
  const isNumber = trial.observations.some((o) => o.name === field);
  const prefix = `amend-${trial.id}`;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    let newValue: number | string | boolean = value;
    if (isNumber) {
      const n = Number(value.trim().replace(',', '.'));
      if (value.trim() === '' || !Number.isFinite(n)) return setError({ code: 'invalid_input', field: 'newValue', message: `give the corrected ${field} as a number` });
      newValue = n;
    } else if (field === 'passed') {
      if (!/^(yes|no|true|false)$/i.test(value.trim())) return setError({ code: 'invalid_input', field: 'newValue', message: 'write yes or no' });
      newValue = /^(yes|true)$/i.test(value.trim());
    }
    if (reason.trim().length < 3) return setError({ code: 'invalid_input', field: 'reason', message: 'say why the value is corrected (at least 3 characters)' });
    setBusy(true);
    const res = await postJson(`/api/v1/campaigns/${campaignId}/trials/${trial.id}/amendments`, { field, newValue, reason });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    onDone();
    router.refresh();
  }

  return (
    <form onSubmit={submit} noValidate className="panel" style={{ marginTop: '0.5rem' }}>
      <div className="row">
        <div>
          <label htmlFor={`${prefix}-field`}>Value to correct</label>
          <select id={`${prefix}-field`} value={field} onChange={(e) => setField(e.target.value)}>
            {fields.map((f) => (
              <option key={f} value={f}>
                {f}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${prefix}-value`}>New value</label>
          <input id={`${prefix}-value`} inputMode={isNumber ? 'decimal' : 'text'} value={value} onChange={(e) => setValue(e.target.value)} aria-invalid={error?.field === 'newValue' || undefined} />
        </div>
        <div>
          <label htmlFor={`${prefix}-reason`}>Reason</label>
          <input id={`${prefix}-reason`} value={reason} onChange={(e) => setReason(e.target.value)} aria-invalid={error?.field === 'reason' || undefined} />
        </div>
      </div>
      <ErrorBox error={error} />
      <p>
        <button type="submit" className="btn" disabled={busy}>
          Store correction
        </button>{' '}
        <button type="button" className="btn secondary" onClick={onDone}>
          Cancel
        </button>
      </p>
    </form>
  );
}

function TrialCard({ campaignId, trial }: { campaignId: string; trial: RigTrialItem }) {
  const [open, setOpen] = useState<'amend' | 'track' | null>(null);
  const canLog = useMay('logTrials');
  return (
    <li data-testid="logged-trial" data-run={trial.runNumber}>
      <strong>Run {trial.runNumber}</strong> ({trial.status}
      {trial.passed === false ? `: ${trial.failureReason || 'no reason given'}` : ''})
      <ul style={{ margin: '0.3rem 0' }}>
        {trial.observations.length === 0 ? <li className="muted">no readings</li> : null}
        {trial.observations.map((o) => (
          <li key={o.name}>
            {o.name}: <Corrected trial={trial} field={o.name} current={String(o.value)} /> {o.unit} <span className="muted">({o.origin})</span>
          </li>
        ))}
        {trial.notes || originalOf(trial, 'notes') !== null ? (
          <li>
            notes: <Corrected trial={trial} field="notes" current={trial.notes} />
          </li>
        ) : null}
        {trial.tracks.map((k) => (
          <li key={k.id} className="muted">
            track {k.fileName}: {k.hopCount} hops
          </li>
        ))}
      </ul>
      {canLog ? <p style={{ margin: 0 }}>
        <button type="button" className="btn secondary" onClick={() => setOpen(open === 'amend' ? null : 'amend')} aria-label={`Correct a value of run ${trial.runNumber}`}>
          Correct a value
        </button>{' '}
        <button type="button" className="btn secondary" onClick={() => setOpen(open === 'track' ? null : 'track')} aria-label={`Add a motion track to run ${trial.runNumber}`}>
          Add motion track
        </button>
      </p> : null}
      {open === 'amend' ? <AmendForm campaignId={campaignId} trial={trial} onDone={() => setOpen(null)} /> : null}
      {open === 'track' ? <TrackUpload campaignId={campaignId} trialId={trial.id} runNumber={trial.runNumber} /> : null}
    </li>
  );
}

export function RigTrials({ campaignId, trials }: { campaignId: string; trials: RigTrialItem[] }) {
  if (trials.length === 0) return null;
  return (
    <section className="panel rig">
      <h2 style={{ marginTop: 0 }}>Logged on this rig</h2>
      <ul className="queue" data-testid="logged-trials">
        {trials.map((t) => (
          <TrialCard key={t.id} campaignId={campaignId} trial={t} />
        ))}
      </ul>
    </section>
  );
}
