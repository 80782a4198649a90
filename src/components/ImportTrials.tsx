'use client';
/**
 * Import of past trials from a spreadsheet saved as CSV: map each column to a factor, a response, a
 * standard rig reading or a trial field, give the unit its numbers are in, check the file (a
 * row-by-row report), then import all rows when every row is valid, or, explicitly, only the valid ones.
 * A response that stands for a standard reading is offered once, as the response.
 */
import Papa from 'papaparse';
import { useState } from 'react';
import type { ImportReport } from '@/domain/import/trials';
import { FAILURE_KINDS } from '@/domain/metrics/standard-readings';
import { readingTargets, TRIAL_FIELDS } from '@/domain/import/trials';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

export interface ImportTrialsProps {
  campaignId: string;
  factors: { name: string; unit?: string; kind: string }[];
  responses: { name: string; unit?: string }[];
}

interface ImportAnswer {
  report: ImportReport;
  stored: number;
  runNumbers: number[];
  unmatched: string[];
}

/** Mapping values whose column takes a unit. */
const TAKES_UNIT = /^(factor|response|reading):/;

const norm = (s: string) => s.toLowerCase().replace(/\(.*?\)|\[.*?\]/g, '').replace(/[^a-z0-9]/g, '');

/** A unit written in the header, e.g. "payload (mg)" or "apex [cm]". */
function unitInHeader(h: string): string {
  const m = /[([]\s*([^)\]]+?)\s*[)\]]\s*$/.exec(h);
  return m ? m[1]! : '';
}

export function ImportTrials({ campaignId, factors, responses }: ImportTrialsProps) {
  const [fileName, setFileName] = useState('');
  const [csv, setCsv] = useState('');
  const [header, setHeader] = useState<string[]>([]);
  const [mapping, setMapping] = useState<Record<string, string>>({});
  const [units, setUnits] = useState<Record<string, string>>({});
  const [report, setReport] = useState<ImportReport | null>(null);
  const [acceptPartial, setAcceptPartial] = useState(false);
  const [error, setError] = useState<ApiError | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const readings = readingTargets(responses);
  const standsFor = (name: string) => readings.find((r) => r.response && r.name === name);
  const targets = [
    ...factors.map((f) => ({ value: `factor:${f.name}`, label: `factor ${f.name}${f.unit ? ` (${f.unit})` : ''}`, keys: [norm(f.name)] })),
    ...responses.map((r) => {
      const reading = standsFor(r.name);
      return {
        value: `response:${r.name}`,
        label: `response ${r.name}${r.unit ? ` (${r.unit})` : ''}${reading ? ` = reading ${reading.label.toLowerCase()}` : ''}`,
        keys: reading ? [norm(r.name), norm(reading.reading), norm(reading.label)] : [norm(r.name)],
      };
    }),
    ...readings
      .filter((r) => !r.response)
      .map((r) => ({ value: `reading:${r.reading}`, label: `reading ${r.label.toLowerCase()} (${r.unit})`, keys: [norm(r.reading), norm(r.label)] })),
    ...TRIAL_FIELDS.map((t) => ({ value: `field:${t}`, label: `trial ${t}`, keys: [norm(t)] })),
  ];

  async function choose(file: File | undefined) {
    setError(null);
    setMessage(null);
    setReport(null);
    setAcceptPartial(false);
    if (!file) return;
    const text = await file.text();
    const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { preview: 1 });
    const h = (parsed.data[0] ?? []).map((c) => c.trim()).filter((c) => c !== '');
    setFileName(file.name);
    setCsv(text);
    setHeader(h);
    const m: Record<string, string> = {};
    const u: Record<string, string> = {};
    for (const column of h) {
      const hit = targets.find((t) => t.keys.includes(norm(column)));
      m[column] = hit?.value ?? '';
      u[column] = unitInHeader(column);
    }
    setMapping(m);
    setUnits(u);
  }

  async function send(store: boolean) {
    setError(null);
    setMessage(null);
    setBusy(true);
    const usedUnits = Object.fromEntries(Object.entries(units).filter(([c, v]) => v.trim() !== '' && TAKES_UNIT.test(mapping[c] ?? '')));
    const res = await postJson<ImportAnswer>(`/api/v1/campaigns/${campaignId}/imports`, {
      csv,
      mapping,
      units: usedUnits,
      fileName,
      dryRun: !store,
      acceptValidRowsOnly: store && acceptPartial,
    });
    setBusy(false);
    if (!res.ok) return setError(res.error);
    setReport(res.data.report);
    if (store) {
      const n = res.data.runNumbers;
      setMessage(
        `Imported ${res.data.stored} ${res.data.stored === 1 ? 'trial' : 'trials'}${n.length ? ` as runs ${n[0]}–${n[n.length - 1]}` : ''}.` +
          (res.data.unmatched.length ? ` Not linked (no such name in this campaign): ${res.data.unmatched.join(', ')}.` : ''),
      );
      setCsv('');
      setHeader([]);
    }
  }

  const invalid = report ? report.invalidCount : 0;
  return (
    <div className="rig">
      <section className="panel">
        <label htmlFor="import-file">Spreadsheet of past trials (CSV with a header row)</label>
        <input id="import-file" type="file" accept=".csv,text/csv,text/plain" onChange={(e) => void choose(e.target.files?.[0])} />
        {header.length ? (
          <table className="data" data-testid="import-mapping" style={{ marginTop: '0.6rem' }}>
            <thead>
              <tr>
                <th>Column</th>
                <th>Holds</th>
                <th>Unit of its numbers</th>
              </tr>
            </thead>
            <tbody>
              {header.map((column, i) => (
                <tr key={column}>
                  <td>{column}</td>
                  <td>
                    <select aria-label={`Column ${column} holds`} id={`import-map-${i}`} value={mapping[column] ?? ''} onChange={(e) => { setMapping({ ...mapping, [column]: e.target.value }); setReport(null); }}>
                      <option value="">(ignore)</option>
                      {targets.map((t) => (
                        <option key={t.value} value={t.value}>
                          {t.label}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td>
                    <input aria-label={`Column ${column} unit`} value={units[column] ?? ''} onChange={(e) => { setUnits({ ...units, [column]: e.target.value }); setReport(null); }} disabled={!TAKES_UNIT.test(mapping[column] ?? '')} size={6} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : null}
        {header.length ? (
          <p className="muted" data-testid="import-readings-hint">
            The standard readings are checked as at the rig and stored as the rig stores them. A failure reason is one of{' '}
            {FAILURE_KINDS.filter((k) => k !== 'other').join(', ')}, optionally followed by a colon and words (fell: tipped on landing),
            or other: words.
          </p>
        ) : null}
        {header.length ? (
          <p>
            <button type="button" className="btn" disabled={busy} onClick={() => void send(false)}>
              Check file
            </button>
          </p>
        ) : null}
      </section>
      <ErrorBox error={error} />
      {message ? (
        <div className="ok" role="status">
          {message}
        </div>
      ) : null}
      {report && header.length ? (
        <section className="panel" data-testid="import-report">
          <h2 style={{ marginTop: 0 }}>Validation report</h2>
          <p>
            {report.rows.length} rows: {report.validCount} valid, {report.invalidCount} invalid.
          </p>
          {report.fileErrors.map((e, i) => (
            <div className="error" key={i}>
              <strong>{e.field}: </strong>
              {e.message}
            </div>
          ))}
          <table className="data">
            <thead>
              <tr>
                <th className="num">Line</th>
                <th>Row</th>
                <th>Problems and warnings</th>
              </tr>
            </thead>
            <tbody>
              {report.rows.map((r) => (
                <tr key={r.line} data-valid={r.errors.length === 0 && report.fileErrors.length === 0}>
                  <td className="num">{r.line}</td>
                  <td>{r.errors.length ? 'invalid' : 'valid'}</td>
                  <td>
                    {r.errors.map((e, i) => (
                      <div key={`e${i}`}>
                        <strong>{e.column ?? e.field}: </strong>
                        {e.message}
                      </div>
                    ))}
                    {r.warnings.map((w, i) => (
                      <div key={`w${i}`} className="muted">
                        {w.column ?? w.field}: {w.message}
                      </div>
                    ))}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {report.valid ? (
            <p>
              <button type="button" className="btn" disabled={busy} onClick={() => void send(true)}>
                Import all {report.rows.length} trials
              </button>
            </p>
          ) : report.fileErrors.length === 0 && report.validCount > 0 ? (
            <div>
              <p>
                Nothing is imported while a row is invalid. Correct the file and check it again, or import only the valid rows.
              </p>
              <label style={{ display: 'flex', gap: '0.5rem', alignItems: 'center', minHeight: 44 }}>
                <input type="checkbox" checked={acceptPartial} onChange={(e) => setAcceptPartial(e.target.checked)} style={{ width: 28, height: 28 }} />
                Leave out the {invalid} invalid {invalid === 1 ? 'row' : 'rows'}
              </label>
              <p>
                <button type="button" className="btn" disabled={busy || !acceptPartial} onClick={() => void send(true)}>
                  Import only the {report.validCount} valid rows
                </button>
              </p>
            </div>
          ) : (
            <p>Nothing can be imported: correct the file or the mapping and check again.</p>
          )}
        </section>
      ) : null}
    </div>
  );
}
