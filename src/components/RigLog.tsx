'use client';
/**
 * The rig log on a tablet: the rig's queue in planned order, start a trial, enter readings with units,
 * finish. Large touch targets; every refusal names the field and the fix. Start and finish make ONE
 * entry in the tablet's IndexedDB outbox (rig-queue.ts) with a key made here; it is sent at once when
 * the network is up, and replayed on reconnect otherwise, so nothing logged at the bench is lost.
 */
import { useRouter } from 'next/navigation';
import { useCallback, useEffect, useRef, useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';
import { FAILURE_KINDS, failureReasonText, readingFields, type FailureKind, type ReadingField } from '@/domain/metrics/standard-readings';
import { checkTabletReadings } from './rig-readings';
import { deleteEntry, entriesOf, newEntryKey, retryDelayMs, saveEntry, sendEntry, type LogBody, type QueueEntry } from './rig-queue';

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
  /** Build this page was rendered by; keys the service worker's cache and spots a newer deploy. */
  buildId: string;
}

interface ActiveTrial {
  runId: string;
  runNumber: number;
  startedAt: string;
  /** Key of this trial's log entry (kept when a refused entry is corrected and sent again). */
  key: string;
  /** A trial started on the server by an earlier version of this page: finished through its own route. */
  trialId?: string;
}

function fmtValues(v: Record<string, string | number>): string {
  return Object.entries(v)
    .map(([k, x]) => `${k} ${typeof x === 'number' ? Number(x.toPrecision(4)) : x}`)
    .join(' · ');
}

function fmtObservations(o: Record<string, number>): string {
  const parts = Object.entries(o).map(([k, v]) => `${k} ${v}`);
  return parts.length ? parts.join(', ') : 'no readings';
}

const STATE_LABEL: Record<QueueEntry['state'], string> = { sent: 'sent', waiting: 'waiting', conflict: 'conflict', refused: 'refused' };

/** Sent entries are shown for a day, then dropped from the tablet (the server holds them). */
const KEEP_SENT_MS = 24 * 3600 * 1000;

/** One numeric reading: what it is, its unit, and the name it is stored (and named in messages) under. */
function ReadingInput({ field, value, invalid, onChange }: { field: ReadingField; value: string; invalid: boolean; onChange: (v: string) => void }) {
  const unit = field.unit && field.unit !== 'count' ? field.unit : '';
  return (
    <div>
      <label htmlFor={`obs-${field.name}`}>
        {field.label} {unit ? <span className="unit">({unit})</span> : null}
        {field.standard ? <span className="muted"> · {field.name}</span> : null}
      </label>
      <input id={`obs-${field.name}`} inputMode={field.standard === 'hopsCompleted' ? 'numeric' : 'decimal'} value={value} onChange={(e) => onChange(e.target.value)} aria-invalid={invalid || undefined} />
    </div>
  );
}

/** How often an open rig page asks whether a newer version was deployed, ms. */
const VERSION_CHECK_MS = 10 * 60 * 1000;

/** Wait until the worker of `scriptUrl` is the registration's active one (or give up when it is replaced). */
async function activeWorker(reg: ServiceWorkerRegistration, scriptUrl: string): Promise<ServiceWorker | null> {
  const href = new URL(scriptUrl, location.href).href;
  const ours = (w: ServiceWorker | null): w is ServiceWorker => !!w && w.scriptURL === href;
  if (ours(reg.active)) return reg.active;
  const pending = [reg.installing, reg.waiting].find(ours);
  if (!pending) return reg.active;
  await new Promise<void>((resolve) => {
    const done = () => pending.state === 'activated' || pending.state === 'redundant';
    if (done()) return resolve();
    pending.addEventListener('statechange', () => done() && resolve());
  });
  return ours(reg.active) ? reg.active : null;
}

export function RigLog({ campaignId, rigId, timeZone, responses, robots, queue, buildId }: RigLogProps) {
  const router = useRouter();
  const running = queue.find((q) => q.state === 'running' && q.trialId);
  const [active, setActive] = useState<ActiveTrial | null>(
    running ? { runId: running.runId, runNumber: running.runNumber, startedAt: new Date().toISOString(), key: newEntryKey(), trialId: running.trialId! } : null,
  );
  const [robotId, setRobotId] = useState(robots[0]?.id ?? '');
  const [operator, setOperator] = useState('');
  const [readings, setReadings] = useState<Record<string, string>>({});
  const [outcome, setOutcome] = useState<'passed' | 'failed'>('passed');
  const [failureKind, setFailureKind] = useState<FailureKind | ''>('');
  const [failureText, setFailureText] = useState('');
  const [notes, setNotes] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [warnings, setWarnings] = useState<{ field: string; message: string }[]>([]);
  const [busy, setBusy] = useState(false);
  const [newerBuild, setNewerBuild] = useState(false);
  const [entries, setEntries] = useState<QueueEntry[]>([]);
  const sending = useRef(false);
  const retryTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const retryAttempt = useRef(0);
  const flushRef = useRef<() => Promise<void>>(async () => undefined);

  const reload = useCallback(async () => {
    try {
      const list = await entriesOf(campaignId, rigId);
      const cutoff = Date.now() - KEEP_SENT_MS;
      for (const e of list) if (e.state === 'sent' && Date.parse(e.createdAt) < cutoff) await deleteEntry(e.key);
      setEntries(list.filter((e) => !(e.state === 'sent' && Date.parse(e.createdAt) < cutoff)));
      return list;
    } catch {
      return [];
    }
  }, [campaignId, rigId]);

  /** Send every waiting entry, oldest first; on no network, try again later with a growing wait. */
  const flush = useCallback(async () => {
    if (sending.current) return;
    sending.current = true;
    let sentAny = false;
    let stillWaiting = false;
    try {
      const list = await entriesOf(campaignId, rigId);
      for (const entry of list.filter((e) => e.state === 'waiting')) {
        const next = await sendEntry(entry);
        await saveEntry(next);
        if (next.state === 'waiting') {
          stillWaiting = true;
          break;
        }
        sentAny = true;
      }
    } catch {
      stillWaiting = true;
    } finally {
      sending.current = false;
    }
    await reload();
    if (retryTimer.current) clearTimeout(retryTimer.current);
    retryTimer.current = null;
    if (stillWaiting) {
      retryTimer.current = setTimeout(() => void flushRef.current(), retryDelayMs(retryAttempt.current++));
    } else {
      retryAttempt.current = 0;
    }
    if (sentAny && typeof navigator !== 'undefined' && navigator.onLine) router.refresh();
  }, [campaignId, rigId, reload, router]);

  useEffect(() => {
    flushRef.current = flush;
  }, [flush]);

  useEffect(() => {
    // Show what the tablet holds and send what waits, right after the page opens and on every reconnect.
    const first = setTimeout(() => void flushRef.current(), 0);
    const online = () => {
      retryAttempt.current = 0;
      void flushRef.current();
    };
    window.addEventListener('online', online);
    return () => {
      clearTimeout(first);
      window.removeEventListener('online', online);
      if (retryTimer.current) clearTimeout(retryTimer.current);
    };
  }, []);

  // The page shell and its static files are kept by a service worker (one per build, see public/rig-sw.js)
  // so that the page opens offline. The worker of a new build deletes the caches of earlier builds.
  useEffect(() => {
    if (typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
    const scriptUrl = `/rig-sw.js?build=${encodeURIComponent(buildId)}`;
    navigator.serviceWorker
      .register(scriptUrl, { scope: '/campaigns/' })
      .then((reg) => activeWorker(reg, scriptUrl))
      .then((worker) => {
        const urls = [location.href, ...performance.getEntriesByType('resource').map((r) => r.name)].filter((u) => u.startsWith(location.origin));
        worker?.postMessage({ type: 'cache', urls });
      })
      .catch(() => {
        /* without a service worker the page still works online, and the outbox still keeps entries */
      });
  }, [buildId]);

  // A newer deploy: say so, so the operator reloads between trials (the outbox in IndexedDB is kept).
  useEffect(() => {
    let stopped = false;
    const check = async () => {
      if (!navigator.onLine) return;
      try {
        const res = await fetch('/api/v1/version', { cache: 'no-store' });
        if (!res.ok) return;
        const server = ((await res.json()) as { buildId?: string }).buildId;
        if (!stopped && server && server !== buildId) setNewerBuild(true);
      } catch {
        /* offline: ask again later */
      }
    };
    const visible = () => document.visibilityState === 'visible' && void check();
    const first = setTimeout(() => void check(), 3000);
    const timer = setInterval(() => void check(), VERSION_CHECK_MS);
    window.addEventListener('online', check);
    document.addEventListener('visibilitychange', visible);
    return () => {
      stopped = true;
      clearTimeout(first);
      clearInterval(timer);
      window.removeEventListener('online', check);
      document.removeEventListener('visibilitychange', visible);
    };
  }, [buildId]);

  function resetForm() {
    setReadings({});
    setOutcome('passed');
    setFailureKind('');
    setFailureText('');
    setNotes('');
  }

  function start(item: QueueItem) {
    setError(null);
    setMessage(null);
    setWarnings([]);
    setActive({ runId: item.runId, runNumber: item.runNumber, startedAt: new Date().toISOString(), key: newEntryKey() });
    resetForm();
  }

  const fields = readingFields(responses);
  const allFields = [...fields.standard, ...fields.others];
  const failureReason = outcome === 'failed' ? failureReasonText(failureKind, failureText) : '';

  async function finishOnServer(trial: ActiveTrial, observations: Record<string, number>) {
    const res = await postJson<{ warnings: { field: string; message: string }[] }>(`/api/v1/campaigns/${campaignId}/trials/${trial.trialId}/finish`, {
      observations,
      status: outcome === 'failed' ? 'failed' : 'done',
      passed: outcome === 'passed',
      failureReason,
      notes,
    });
    if (!res.ok) return setError(res.error);
    setWarnings(res.data.warnings ?? []);
    setMessage(`Run ${trial.runNumber} logged.`);
    setActive(null);
    router.refresh();
  }

  async function finish(e: React.FormEvent) {
    e.preventDefault();
    if (!active) return;
    setError(null);
    const observations: Record<string, number> = {};
    for (const f of allFields) {
      const raw = (readings[f.name] ?? '').trim().replace(',', '.');
      if (raw === '') continue;
      const n = Number(raw);
      if (!Number.isFinite(n)) {
        setError({ code: 'invalid_input', field: `observations.${f.name}`, message: `${f.name} must be a number${f.unit ? ` in ${f.unit}` : ''}` });
        return;
      }
      observations[f.name] = n;
    }
    if (outcome === 'failed' && failureKind === '') {
      setError({ code: 'invalid_input', field: 'failureReason', message: 'choose why the trial failed: fell, broke, stalled or other' });
      return;
    }
    if (outcome === 'failed' && failureKind === 'other' && failureText.trim() === '') {
      setError({ code: 'invalid_input', field: 'failureReason', message: 'describe the failure in a few words (the reason is "other")' });
      return;
    }
    setBusy(true);
    try {
      if (active.trialId) return await finishOnServer(active, observations);
      const finishedAt = new Date().toISOString();
      const robot = robots.find((r) => r.id === robotId);
      const local = checkTabletReadings(
        responses,
        observations,
        { passed: outcome === 'passed', failureReason, startedAt: active.startedAt, finishedAt },
        { now: finishedAt, robotMassKg: robot ? robot.massGrams / 1000 : null },
      );
      if (local.errors.length) {
        setError({ code: 'invalid_input', field: local.errors[0]!.field, message: local.errors[0]!.message });
        return;
      }
      const body: LogBody = {
        runId: active.runId,
        rigId,
        robotId: robotId || undefined,
        operator,
        startedAt: active.startedAt,
        finishedAt,
        observations,
        status: outcome === 'failed' ? 'failed' : 'done',
        passed: outcome === 'passed',
        failureReason,
        notes,
      };
      const entry: QueueEntry = { key: active.key, campaignId, rigId, runNumber: active.runNumber, body, state: 'waiting', createdAt: new Date().toISOString(), attempts: 0 };
      await saveEntry(entry);
      if (sending.current) {
        // A replay is under way; this entry goes with the next one.
        setWarnings(local.warnings);
        setMessage(`Run ${active.runNumber} logged on this tablet; waiting to send.`);
        setActive(null);
        await reload();
        return;
      }
      const sent = await sendEntry(entry);
      if (sent.state === 'refused') {
        // Nothing was stored: the trial stays open to correct the reading.
        await deleteEntry(entry.key);
        setError(sent.error ?? null);
        return;
      }
      await saveEntry(sent);
      setActive(null);
      if (sent.state === 'sent') {
        setWarnings(sent.warnings ?? []);
        setMessage(`Run ${entry.runNumber} logged.`);
        router.refresh();
      } else if (sent.state === 'waiting') {
        setWarnings(local.warnings);
        setMessage(`Run ${entry.runNumber} logged on this tablet; waiting to send (no network).`);
        if (!retryTimer.current) retryTimer.current = setTimeout(() => void flushRef.current(), retryDelayMs(retryAttempt.current++));
      } else {
        setMessage(`Run ${entry.runNumber} was not stored: see the conflict below.`);
      }
      await reload();
    } catch {
      setError({ code: 'storage', field: null, message: 'this tablet could not keep the entry (browser storage unavailable); write the readings down and try again' });
    } finally {
      setBusy(false);
    }
  }

  async function keepTheirs(entry: QueueEntry) {
    await deleteEntry(entry.key);
    await reload();
  }

  async function storeMineAsRepeat(entry: QueueEntry) {
    await saveEntry({ ...entry, state: 'waiting', body: { ...entry.body, repeat: true }, conflict: undefined, error: undefined });
    await flush();
  }

  const locallyLogged = new Set(entries.filter((e) => e.state !== 'refused').map((e) => e.body.runId));
  const waiting = queue.filter((q) => (q.state === 'scheduled' || q.state === 'planned') && !locallyLogged.has(q.runId) && q.runId !== active?.runId);
  const clock = (iso: string) => new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', hour: '2-digit', minute: '2-digit' }).format(new Date(iso));
  const waitingCount = entries.filter((e) => e.state === 'waiting').length;

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
      {newerBuild ? (
        <div className="warning" aria-live="polite" data-testid="newer-version">
          A newer version of the rig page is ready. Entries waiting on this tablet are kept.{' '}
          {active ? (
            <span className="muted">Reload after finishing or cancelling the trial in progress.</span>
          ) : (
            <button type="button" className="btn secondary" onClick={() => location.reload()}>
              Reload now
            </button>
          )}
        </div>
      ) : null}
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
          <div className="row" data-testid="standard-readings">
            {fields.standard.map((f) => (
              <ReadingInput key={f.name} field={f} value={readings[f.name] ?? ''} invalid={error?.field === `observations.${f.name}`} onChange={(v) => setReadings({ ...readings, [f.name]: v })} />
            ))}
          </div>
          <div className="row" style={{ marginTop: '0.6rem' }}>
            <div>
              <label htmlFor="rig-outcome">Outcome</label>
              <select id="rig-outcome" value={outcome} onChange={(e) => setOutcome(e.target.value as 'passed' | 'failed')}>
                <option value="passed">passed: completed the hop sequence</option>
                <option value="failed">failed</option>
              </select>
            </div>
            {outcome === 'failed' ? (
              <div>
                <label htmlFor="rig-reason">Failure reason</label>
                <select id="rig-reason" value={failureKind} onChange={(e) => setFailureKind(e.target.value as FailureKind | '')} aria-invalid={(error?.field === 'failureReason' && failureKind === '') || undefined}>
                  <option value="">(choose)</option>
                  {FAILURE_KINDS.map((k) => (
                    <option key={k} value={k}>
                      {k}
                    </option>
                  ))}
                </select>
              </div>
            ) : null}
            {outcome === 'failed' && failureKind !== '' ? (
              <div>
                <label htmlFor="rig-reason-text">{failureKind === 'other' ? 'What happened' : 'Details (optional)'}</label>
                <input id="rig-reason-text" value={failureText} onChange={(e) => setFailureText(e.target.value)} aria-invalid={(error?.field === 'failureReason' && failureKind === 'other') || undefined} />
              </div>
            ) : null}
          </div>
          {fields.others.length ? (
            <>
              <h3 style={{ marginBottom: '0.3rem' }}>Other responses of this campaign</h3>
              <div className="row" data-testid="other-readings">
                {fields.others.map((f) => (
                  <ReadingInput key={f.name} field={f} value={readings[f.name] ?? ''} invalid={error?.field === `observations.${f.name}`} onChange={(v) => setReadings({ ...readings, [f.name]: v })} />
                ))}
              </div>
            </>
          ) : null}
          <label htmlFor="rig-notes" style={{ marginTop: '0.6rem' }}>
            Notes
          </label>
          <textarea id="rig-notes" rows={2} value={notes} onChange={(e) => setNotes(e.target.value)} />
          <p>
            <button type="submit" className="btn" disabled={busy}>
              Finish trial
            </button>{' '}
            {!active.trialId ? (
              <button type="button" className="btn secondary" disabled={busy} onClick={() => setActive(null)}>
                Cancel (not started)
              </button>
            ) : null}
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
      <section className="panel" aria-label="Entries on this tablet">
        <h2 style={{ marginTop: 0 }}>Entries on this tablet</h2>
        <p data-testid="outbox-count" aria-live="polite">
          {waitingCount === 0 ? 'Nothing waiting to send.' : `${waitingCount} ${waitingCount === 1 ? 'entry' : 'entries'} waiting to send`}
          {waitingCount > 0 ? (
            <>
              {' '}
              <button type="button" className="btn secondary" onClick={() => void flush()}>
                Send now
              </button>
            </>
          ) : null}
        </p>
        <ul className="queue" data-testid="outbox">
          {entries
            .slice()
            .reverse()
            .map((e) => (
              <li key={e.key} data-state={e.state}>
                <strong>Run {e.runNumber}</strong> — <span className={`entry-${e.state}`}>{STATE_LABEL[e.state]}</span>
                <br />
                <span className="muted">{fmtObservations(e.body.observations)}</span>
                {e.state === 'refused' && e.error ? (
                  <div className="error">
                    <strong>{e.error.field ?? 'entry'}: </strong>
                    {e.error.message}{' '}
                    <button type="button" className="btn secondary" onClick={() => void keepTheirs(e)}>
                      Discard
                    </button>
                  </div>
                ) : null}
                {e.state === 'sent' && e.warnings?.length ? (
                  <div className="warning">
                    {e.warnings.map((w, i) => (
                      <div key={i}>
                        <strong>{w.field}: </strong>
                        {w.message}
                      </div>
                    ))}
                  </div>
                ) : null}
                {e.state === 'conflict' && e.conflict ? (
                  <div className="warning" data-testid="conflict">
                    <p style={{ marginTop: 0 }}>{e.conflict.message}</p>
                    <table className="data">
                      <thead>
                        <tr>
                          <th></th>
                          <th>On the server</th>
                          <th>From this tablet</th>
                        </tr>
                      </thead>
                      <tbody>
                        <tr>
                          <th>Readings</th>
                          <td>{fmtObservations(e.conflict.stored.observations)}</td>
                          <td>{fmtObservations(e.conflict.sent.observations)}</td>
                        </tr>
                        <tr>
                          <th>Outcome</th>
                          <td>{e.conflict.stored.status}</td>
                          <td>{e.conflict.sent.status}</td>
                        </tr>
                        <tr>
                          <th>Notes</th>
                          <td>{e.conflict.stored.notes}</td>
                          <td>{e.conflict.sent.notes}</td>
                        </tr>
                      </tbody>
                    </table>
                    <p>
                      <button type="button" className="btn secondary" onClick={() => void keepTheirs(e)}>
                        Keep the server&apos;s version
                      </button>{' '}
                      {e.error?.field === 'runId' ? (
                        <button type="button" className="btn" onClick={() => void storeMineAsRepeat(e)}>
                          Store mine as a repeat trial
                        </button>
                      ) : (
                        <span className="muted">Correct the server&apos;s values with an amendment below if mine are right.</span>
                      )}
                    </p>
                  </div>
                ) : null}
              </li>
            ))}
        </ul>
      </section>
    </div>
  );
}
