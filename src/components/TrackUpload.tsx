'use client';
/**
 * Motion track of a logged trial: choose a CSV file, map its columns (time, x, y, z), give the units
 * and an optional landing target; the server computes the per-hop metrics, stores the track and
 * derives the matching responses. Shown here: the per-hop table and z(t) with the flight phases shaded.
 */
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { parseTrackCsv } from '@/domain/tracks/csv';
import type { Hop, TrackMetrics } from '@/domain/tracks/hops';
import { listMcapTopics, type McapTopic } from '@/domain/tracks/mcap';
import { postText, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

interface StoredTrack {
  trackId: string;
  /** Downsampled z(t) in s and m (answered for MCAP logs; a CSV is plotted from the file itself). */
  profile?: { t: number[]; z: number[] };
  metrics: TrackMetrics;
  stored: { name: string; value: number; unit: string }[];
  kept: { name: string; typed: number; fromTrack: number; unit: string }[];
}

/** Columns guessed from header names; the operator can change every choice. */
function guessColumn(header: string[], role: 'time' | 'x' | 'y' | 'z'): string {
  const patterns: Record<typeof role, RegExp> = { time: /^(t|time|timestamp|sec|seconds|ms)([_ ].*)?$|time/i, x: /(^|[_ .])x($|[_ .])|^x/i, y: /(^|[_ .])y($|[_ .])|^y/i, z: /(^|[_ .])z($|[_ .])|^z|height/i };
  return header.find((h) => patterns[role].test(h)) ?? '';
}

function headerOf(text: string): string[] {
  const line = (text.split(/\r?\n/, 1)[0] ?? '').replace(/^\uFEFF/, '');
  const delimiter = [',', ';', '\t'].map((d) => [d, line.split(d).length] as const).sort((a, b) => b[1] - a[1])[0]![0];
  return line.split(delimiter).map((h) => h.trim().replace(/^"|"$/g, ''));
}

/** Schemas that carry a position; such a topic is chosen first. */
const POSE_SCHEMA = /pose|transform|odometry|position/i;

const fmt = (v: number | undefined | null, digits = 3) => (v === undefined || v === null || !Number.isFinite(v) ? '—' : Number(v.toPrecision(digits)).toString());

export function TrackUpload({ campaignId, trialId, runNumber }: { campaignId: string; trialId: string; runNumber: number }) {
  const router = useRouter();
  const [fileName, setFileName] = useState('');
  const [text, setText] = useState('');
  const [format, setFormat] = useState<'csv' | 'mcap'>('csv');
  const [bytes, setBytes] = useState<ArrayBuffer | null>(null);
  const [topic, setTopic] = useState('');
  /** Topics of the chosen MCAP log (read on the tablet); null when the file could not be listed. */
  const [topics, setTopics] = useState<McapTopic[] | null>(null);
  const [header, setHeader] = useState<string[]>([]);
  const [columns, setColumns] = useState({ time: '', x: '', y: '', z: '' });
  const [lengthUnit, setLengthUnit] = useState<'m' | 'mm'>('mm');
  const [timeUnit, setTimeUnit] = useState<'s' | 'ms'>('s');
  const [targetX, setTargetX] = useState('');
  const [targetY, setTargetY] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const [result, setResult] = useState<StoredTrack | null>(null);
  const [busy, setBusy] = useState(false);
  const prefix = `track-${trialId}`;

  async function choose(file: File | undefined) {
    setError(null);
    setResult(null);
    if (!file) return;
    if (/\.mcap$/i.test(file.name)) {
      setFormat('mcap');
      setFileName(file.name);
      const buffer = await file.arrayBuffer();
      setBytes(buffer);
      setText('');
      setHeader([]);
      try {
        const list = listMcapTopics(new Uint8Array(buffer));
        setTopics(list);
        setTopic((list.find((t) => POSE_SCHEMA.test(t.schemaName)) ?? list.find((t) => t.messages > 0) ?? list[0])?.topic ?? '');
      } catch (err) {
        // The server reads the file again and answers with the field at fault; the topic is typed.
        setTopics(null);
        setError({ code: 'invalid_input', field: '(body)', message: err instanceof Error ? err.message : String(err) });
      }
      return;
    }
    setFormat('csv');
    setBytes(null);
    const content = await file.text();
    const h = headerOf(content);
    setFileName(file.name);
    setText(content);
    setHeader(h);
    setColumns({ time: guessColumn(h, 'time'), x: guessColumn(h, 'x'), y: guessColumn(h, 'y'), z: guessColumn(h, 'z') });
    if (/_ms\b|\(ms\)|\bms\b/i.test(guessColumn(h, 'time'))) setTimeUnit('ms');
  }

  async function uploadMcap() {
    if (!bytes) return;
    if (topic.trim() === '') return setError({ code: 'invalid_input', field: 'topic', message: 'name the topic that carries the robot pose, e.g. /robot/pose' });
    const q = new URLSearchParams({ format: 'mcap', topic: topic.trim(), fileName });
    if (targetX.trim() !== '' && targetY.trim() !== '') {
      q.set('targetX', targetX.trim());
      q.set('targetY', targetY.trim());
    }
    setBusy(true);
    const res = await postText<StoredTrack>(`/api/v1/campaigns/${campaignId}/trials/${trialId}/tracks?${q}`, bytes, 'application/octet-stream');
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setResult(res.data);
    router.refresh();
  }

  async function upload(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    if (format === 'mcap') return uploadMcap();
    for (const role of ['time', 'x', 'y', 'z'] as const) {
      if (!columns[role]) return setError({ code: 'invalid_input', field: role, message: `choose the column that holds ${role}` });
    }
    const q = new URLSearchParams({ ...columns, lengthUnit, timeUnit, fileName });
    if (targetX.trim() !== '' || targetY.trim() !== '') {
      if (!Number.isFinite(Number(targetX)) || !Number.isFinite(Number(targetY)) || targetX.trim() === '' || targetY.trim() === '') {
        return setError({ code: 'invalid_input', field: 'target', message: `give both target coordinates as numbers in ${lengthUnit}, or neither` });
      }
      q.set('targetX', targetX.trim());
      q.set('targetY', targetY.trim());
    }
    setBusy(true);
    const res = await postText<StoredTrack>(`/api/v1/campaigns/${campaignId}/trials/${trialId}/tracks?${q}`, text);
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setResult(res.data);
    router.refresh();
  }

  return (
    <div className="track-upload">
      <form onSubmit={upload} noValidate>
        <label htmlFor={`${prefix}-file`}>Motion track of run {runNumber} (CSV, or an MCAP log)</label>
        <input id={`${prefix}-file`} type="file" accept=".csv,.mcap,text/csv,text/plain" onChange={(e) => void choose(e.target.files?.[0])} />
        {format === 'mcap' && bytes ? (
          <>
            <div className="row" style={{ marginTop: '0.6rem' }}>
              <div>
                <label htmlFor={`${prefix}-topic`}>Pose topic</label>
                {topics && topics.length ? (
                  <select id={`${prefix}-topic`} value={topic} onChange={(e) => setTopic(e.target.value)} aria-invalid={error?.field === 'topic' || undefined}>
                    {topics.map((t) => (
                      <option key={t.topic} value={t.topic}>
                        {t.topic} — {t.schemaName || `no schema, ${t.messageEncoding}`} ({t.messages} messages)
                      </option>
                    ))}
                  </select>
                ) : (
                  <input id={`${prefix}-topic`} value={topic} onChange={(e) => setTopic(e.target.value)} placeholder="/robot/pose" aria-invalid={error?.field === 'topic' || undefined} />
                )}
              </div>
              <TargetFields prefix={prefix} unit="m" x={targetX} y={targetY} setX={setTargetX} setY={setTargetY} />
            </div>
            <SubmitTrack busy={busy} />
          </>
        ) : null}
        {header.length ? (
          <>
            <div className="row" style={{ marginTop: '0.6rem' }}>
              {(['time', 'x', 'y', 'z'] as const).map((role) => (
                <div key={role}>
                  <label htmlFor={`${prefix}-${role}`}>Column for {role}</label>
                  <select id={`${prefix}-${role}`} value={columns[role]} onChange={(e) => setColumns({ ...columns, [role]: e.target.value })} aria-invalid={error?.field === role || undefined}>
                    <option value="">(choose)</option>
                    {header.map((h) => (
                      <option key={h} value={h}>
                        {h}
                      </option>
                    ))}
                  </select>
                </div>
              ))}
            </div>
            <div className="row" style={{ marginTop: '0.6rem' }}>
              <div>
                <label htmlFor={`${prefix}-lu`}>Length unit</label>
                <select id={`${prefix}-lu`} value={lengthUnit} onChange={(e) => setLengthUnit(e.target.value as 'm' | 'mm')}>
                  <option value="mm">mm</option>
                  <option value="m">m</option>
                </select>
              </div>
              <div>
                <label htmlFor={`${prefix}-tu`}>Time unit</label>
                <select id={`${prefix}-tu`} value={timeUnit} onChange={(e) => setTimeUnit(e.target.value as 's' | 'ms')}>
                  <option value="s">s</option>
                  <option value="ms">ms</option>
                </select>
              </div>
              <TargetFields prefix={prefix} unit={lengthUnit} x={targetX} y={targetY} setX={setTargetX} setY={setTargetY} />
            </div>
            <SubmitTrack busy={busy} />
          </>
        ) : null}
      </form>
      <ErrorBox error={error} />
      {result ? <TrackResult result={result} samples={result.profile ? { t: result.profile.t, z: result.profile.z, length: result.profile.t.length } : csvSamples(text, columns, lengthUnit, timeUnit)} /> : null}
    </div>
  );
}

interface HeightSamples {
  t: ArrayLike<number>;
  z: ArrayLike<number>;
  length: number;
}

/** Samples of the chosen CSV in s and m, for the plot (null when the file cannot be read). */
/** The optional landing target, in the unit the track's positions are read in. */
function TargetFields({ prefix, unit, x, y, setX, setY }: { prefix: string; unit: string; x: string; y: string; setX: (v: string) => void; setY: (v: string) => void }) {
  return (
    <>
      <div>
        <label htmlFor={`${prefix}-tx`}>Target x ({unit}, optional)</label>
        <input id={`${prefix}-tx`} inputMode="decimal" value={x} onChange={(e) => setX(e.target.value)} />
      </div>
      <div>
        <label htmlFor={`${prefix}-ty`}>Target y ({unit}, optional)</label>
        <input id={`${prefix}-ty`} inputMode="decimal" value={y} onChange={(e) => setY(e.target.value)} />
      </div>
    </>
  );
}

function SubmitTrack({ busy }: { busy: boolean }) {
  return (
    <p>
      <button type="submit" className="btn" disabled={busy}>
        Compute hops and store track
      </button>
    </p>
  );
}

function csvSamples(csv: string, columns: { time: string; x: string; y: string; z: string }, lengthUnit: 'm' | 'mm', timeUnit: 's' | 'ms'): HeightSamples | null {
  try {
    return parseTrackCsv(new TextEncoder().encode(csv), columns, { timeScale: timeUnit === 'ms' ? 1e-3 : 1, lengthScale: lengthUnit === 'mm' ? 1e-3 : 1 });
  } catch {
    return null;
  }
}

function TrackResult({ result, samples }: { result: StoredTrack; samples: HeightSamples | null }) {
  const { hops, summary, warnings } = result.metrics;
  return (
    <div data-testid="track-result">
      <div className="ok" role="status">
        {hops.length} {hops.length === 1 ? 'hop' : 'hops'} found.{' '}
        {result.stored.length ? `Stored from the track: ${result.stored.map((s) => `${s.name} ${fmt(s.value, 4)} ${s.unit}`.trim()).join(', ')}.` : 'No response of this campaign is derived from tracks.'}
      </div>
      {result.kept.map((k) => (
        <div className="warning" key={k.name}>
          <strong>{k.name}: </strong>the typed value {fmt(k.typed, 4)} {k.unit} was kept; the track gives {fmt(k.fromTrack, 4)} {k.unit}. Correct the value with an amendment if the track is right.
        </div>
      ))}
      {warnings.map((w, i) => (
        <div className="warning" key={i}>
          {w}
        </div>
      ))}
      {samples ? <TrackPlot samples={samples} hops={hops} ground={summary.groundLevel} /> : null}
      <HopTable hops={hops} />
    </div>
  );
}

/** Per-hop table in display units (mm, ms, m/s, degrees). */
export function HopTable({ hops }: { hops: Hop[] }) {
  const hasTarget = hops.some((h) => h.landingError !== undefined);
  const hasEnergy = hops.some((h) => h.energy !== undefined);
  return (
    <div style={{ overflowX: 'auto' }}>
      <table className="data" data-testid="hop-table">
        <thead>
          <tr>
            <th className="num">Hop</th>
            <th className="num">Takeoff (s)</th>
            <th className="num">Landing (s)</th>
            <th className="num">Flight (ms)</th>
            <th className="num">Stance (ms)</th>
            <th className="num">Apex (mm)</th>
            <th className="num">Length (mm)</th>
            <th className="num">Takeoff speed (m/s)</th>
            <th className="num">Angle (°)</th>
            <th className="num">Horizontal speed (m/s)</th>
            <th className="num">Restitution</th>
            {hasTarget ? <th className="num">Landing error (mm)</th> : null}
            {hasEnergy ? <th className="num">Energy (mJ)</th> : null}
            {hasEnergy ? <th className="num">Cost of transport</th> : null}
            <th className="num">Fitted g (m/s²)</th>
          </tr>
        </thead>
        <tbody>
          {hops.map((h) => (
            <tr key={h.index}>
              <td className="num">{h.index}</td>
              <td className="num">{h.takeoffTime.toFixed(3)}</td>
              <td className="num">{h.landingTime.toFixed(3)}</td>
              <td className="num">{fmt(h.flightTime * 1000)}</td>
              <td className="num">{h.stanceTime === undefined ? '—' : fmt(h.stanceTime * 1000)}</td>
              <td className="num">{fmt(h.apexHeight * 1000)}</td>
              <td className="num">{fmt(h.hopLength * 1000)}</td>
              <td className="num">{fmt(h.takeoffSpeed)}</td>
              <td className="num">{fmt(h.takeoffAngleDeg)}</td>
              <td className="num">{fmt(h.horizontalSpeed)}</td>
              <td className="num">{fmt(h.restitution)}</td>
              {hasTarget ? <td className="num">{h.landingError === undefined ? '—' : fmt(h.landingError * 1000)}</td> : null}
              {hasEnergy ? <td className="num">{h.energy === undefined ? '—' : fmt(h.energy * 1000)}</td> : null}
              {hasEnergy ? <td className="num">{fmt(h.costOfTransport)}</td> : null}
              <td className="num">{fmt(h.fittedGravity)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

const PLOT_W = 720;
const PLOT_H = 220;
const PAD = { left: 48, right: 12, top: 12, bottom: 32 };
/** At most this many plotted points: the min and max of each time bucket keep the arcs' shape. */
const PLOT_BUCKETS = 600;

/** z(t) of the track with each hop's flight phase shaded and its apex marked; plain SVG. */
export function TrackPlot({ samples, hops, ground }: { samples: HeightSamples; hops: Hop[]; ground: number }) {
  const n = samples.length;
  if (n < 2) return null;
  const t0 = samples.t[0]!;
  const t1 = samples.t[n - 1]!;
  let zMin = Infinity;
  let zMax = -Infinity;
  for (let i = 0; i < n; i++) {
    const z = samples.z[i]!;
    if (z < zMin) zMin = z;
    if (z > zMax) zMax = z;
  }
  if (!(t1 > t0) || !(zMax >= zMin)) return null;
  const span = zMax - zMin || 1e-3;
  const sx = (t: number) => PAD.left + ((t - t0) / (t1 - t0)) * (PLOT_W - PAD.left - PAD.right);
  const sy = (z: number) => PLOT_H - PAD.bottom - ((z - zMin) / span) * (PLOT_H - PAD.top - PAD.bottom);
  const points: string[] = [];
  const per = Math.max(1, Math.ceil(n / PLOT_BUCKETS));
  for (let start = 0; start < n; start += per) {
    const end = Math.min(n, start + per);
    let lo = start;
    let hi = start;
    for (let i = start; i < end; i++) {
      if (samples.z[i]! < samples.z[lo]!) lo = i;
      if (samples.z[i]! > samples.z[hi]!) hi = i;
    }
    for (const i of lo <= hi ? [lo, hi] : [hi, lo]) points.push(`${sx(samples.t[i]!).toFixed(1)},${sy(samples.z[i]!).toFixed(1)}`);
  }
  const ticks = [zMin, zMin + span / 2, zMax];
  return (
    <figure style={{ margin: '0.6rem 0' }}>
      <svg viewBox={`0 0 ${PLOT_W} ${PLOT_H}`} width="100%" role="img" aria-label={`Height over time with ${hops.length} flight phases shaded`} data-testid="track-plot">
        {hops.map((h) => (
          <rect key={h.index} x={sx(h.takeoffTime)} y={PAD.top} width={Math.max(1, sx(h.landingTime) - sx(h.takeoffTime))} height={PLOT_H - PAD.top - PAD.bottom} fill="#cfe3f7" data-hop={h.index} />
        ))}
        <line x1={PAD.left} x2={PLOT_W - PAD.right} y1={sy(ground)} y2={sy(ground)} stroke="#999" strokeDasharray="4 3" />
        <polyline points={points.join(' ')} fill="none" stroke="#1d4f91" strokeWidth={1.2} />
        {hops.map((h) => (
          <circle key={h.index} cx={sx(h.apexTime)} cy={sy(ground + h.apexHeight)} r={3} fill="#c0392b" />
        ))}
        <line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={PLOT_H - PAD.bottom} stroke="#333" />
        <line x1={PAD.left} x2={PLOT_W - PAD.right} y1={PLOT_H - PAD.bottom} y2={PLOT_H - PAD.bottom} stroke="#333" />
        {ticks.map((z, i) => (
          <text key={i} x={PAD.left - 4} y={sy(z) + 4} fontSize={10} textAnchor="end">
            {fmt(z * 1000)}
          </text>
        ))}
        <text x={PAD.left} y={PLOT_H - 10} fontSize={10}>
          {fmt(t0)} s
        </text>
        <text x={PLOT_W - PAD.right} y={PLOT_H - 10} fontSize={10} textAnchor="end">
          {fmt(t1)} s
        </text>
        <text x={PAD.left + 6} y={PAD.top + 10} fontSize={10}>
          z (mm)
        </text>
      </svg>
      <figcaption className="muted">Height z over time; shaded: flight phases found in the track; dots: fitted apex of each hop.</figcaption>
    </figure>
  );
}
