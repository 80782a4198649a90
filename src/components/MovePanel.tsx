'use client';
/** Move a whole plot to another rig or time on the week grid; the server checks it with the schedule engine. */
import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

export interface MovablePlot {
  /** Whole-plot label, or "run <n>" for a run outside any whole plot. */
  key: string;
  wholePlot?: number;
  runId?: string;
  label: string;
  /** Run ids (run numbers) in design order, with their factor values. */
  runs: { id: string; values: Record<string, string | number | boolean> }[];
  rigId: string;
  day: string;
  time: string;
}

/** Run ids of a plot sorted by one factor (stable, so ties keep the design order). */
export function sortedBy(runs: MovablePlot['runs'], factor: string): string[] {
  return runs
    .map((r, i) => ({ r, i }))
    .sort((a, b) => {
      const x = a.r.values[factor];
      const y = b.r.values[factor];
      const c = typeof x === 'number' && typeof y === 'number' ? x - y : String(x).localeCompare(String(y));
      return c || a.i - b.i;
    })
    .map(({ r }) => r.id);
}

export function MovePanel({ campaignId, plots, rigs, factors }: { campaignId: string; plots: MovablePlot[]; rigs: { id: string; name: string }[]; factors: string[] }) {
  const router = useRouter();
  const [key, setKey] = useState(plots[0]?.key ?? '');
  const plot = plots.find((p) => p.key === key) ?? plots[0];
  // Empty until chosen: the plot's current place fills in (also when plots arrive after a re-render).
  const [rigChoice, setRigId] = useState('');
  const [dayChoice, setDay] = useState('');
  const [timeChoice, setTime] = useState('');
  const rigId = rigChoice || plot?.rigId || rigs[0]?.id || '';
  const day = dayChoice || plot?.day || '';
  const time = timeChoice || plot?.time || '09:00';
  const [order, setOrder] = useState('design');
  const [error, setError] = useState<ApiError | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const design = useMemo(() => plot?.runs.map((r) => r.id) ?? [], [plot]);
  const options = factors.map((f) => {
    const ids = plot ? sortedBy(plot.runs, f) : [];
    return { value: f, ids, same: ids.every((id, i) => id === design[i]) };
  });

  function choose(k: string) {
    const p = plots.find((x) => x.key === k);
    setKey(k);
    setOrder('design');
    if (p) {
      setRigId('');
      setDay('');
      setTime('');
    }
  }

  async function move(e: React.FormEvent) {
    e.preventDefault();
    if (!plot) return;
    setError(null);
    setDone(null);
    const runOrder = order === 'design' ? design : options.find((o) => o.value === order)!.ids;
    const body = { ...(plot.wholePlot !== undefined ? { wholePlot: plot.wholePlot } : { runId: plot.runId }), rig: rigId, day, time, runOrder };
    setBusy(true);
    const res = await postJson<{ moved: { runId: string; start: string }[] }>(`/api/v1/campaigns/${campaignId}/schedule/move`, body);
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setDone(`Moved ${plot.label}: ${res.data.moved.length} runs to ${rigs.find((r) => r.id === rigId)?.name ?? 'the rig'}, in design order.`);
    router.refresh();
  }

  if (plots.length === 0) return null;
  return (
    <form className="panel no-print" onSubmit={move} noValidate data-testid="move-panel">
      <h2 style={{ marginTop: 0 }}>Move a whole plot</h2>
      <p className="muted">
        A whole plot moves as one piece, its changeover first. Its runs keep the randomised design order: sorting them by convenience is refused, because it silently turns a
        randomised design into a split-plot one.
      </p>
      <div className="row">
        <div>
          <label htmlFor="m-plot">Whole plot</label>
          <select id="m-plot" value={plot?.key} onChange={(e) => choose(e.target.value)} aria-invalid={error?.field === 'wholePlot' || undefined}>
            {plots.map((p) => (
              <option key={p.key} value={p.key}>
                {p.label} (runs {p.runs.map((r) => r.id).join(', ')})
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="m-rig">Move to rig</label>
          <select id="m-rig" value={rigId} onChange={(e) => setRigId(e.target.value)} aria-invalid={error?.field === 'rig' || undefined}>
            {rigs.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name}
              </option>
            ))}
          </select>
        </div>
        <div className="narrow" style={{ flexBasis: 170 }}>
          <label htmlFor="m-day">New day</label>
          <input id="m-day" type="date" value={day} onChange={(e) => setDay(e.target.value)} aria-invalid={error?.field === 'day' || error?.field === 'start' || undefined} />
        </div>
        <div className="narrow" style={{ flexBasis: 120 }}>
          <label htmlFor="m-time">Start time</label>
          <input id="m-time" type="time" value={time} onChange={(e) => setTime(e.target.value)} aria-invalid={error?.field === 'time' || error?.field === 'start' || undefined} />
        </div>
        <div>
          <label htmlFor="m-order">Run order inside the plot</label>
          <select id="m-order" value={order} onChange={(e) => setOrder(e.target.value)} aria-invalid={error?.field === 'runOrder' || undefined}>
            <option value="design">design order (as randomised)</option>
            {options.map((o) => (
              <option key={o.value} value={o.value}>
                sorted by {o.value}
                {o.same ? ' (same as design order)' : ''}
              </option>
            ))}
          </select>
        </div>
      </div>
      <ErrorBox error={error} />
      {done ? (
        <div className="ok" role="status">
          {done}
        </div>
      ) : null}
      <button type="submit" className="btn" disabled={busy}>
        {busy ? 'Checking…' : 'Move whole plot'}
      </button>
    </form>
  );
}
