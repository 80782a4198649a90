'use client';
/** Create a campaign: factors, responses, robots and rigs, validated by the same schema as the API. */
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

interface FactorDraft {
  name: string;
  kind: 'continuous' | 'discrete' | 'categorical';
  unit: string;
  low: string;
  high: string;
  list: string;
  hardToChange: boolean;
  changeMinutes: string;
}
interface ResponseDraft {
  name: string;
  unit: string;
  goal: 'maximize' | 'minimize' | 'target';
  target: string;
}
interface RobotDraft {
  name: string;
  massGrams: string;
  heightMm: string;
}
interface RigDraft {
  name: string;
  timeZone: string;
  startTime: string;
  endTime: string;
}

const newFactor = (): FactorDraft => ({ name: '', kind: 'continuous', unit: '', low: '', high: '', list: '', hardToChange: false, changeMinutes: '0' });
const newResponse = (): ResponseDraft => ({ name: '', unit: '', goal: 'maximize', target: '' });

/** The readings most hop trials log; the rig page's plausibility checks know them by these names. */
const STANDARD_READINGS: ResponseDraft[] = [
  { name: 'apex_height', unit: 'mm', goal: 'maximize', target: '' },
  { name: 'hops_completed', unit: 'count', goal: 'maximize', target: '' },
  { name: 'distance_travelled', unit: 'mm', goal: 'maximize', target: '' },
  { name: 'energy_drawn', unit: 'mJ', goal: 'minimize', target: '' },
];

function num(s: string): number | undefined {
  if (s.trim() === '') return undefined;
  const n = Number(s);
  return Number.isFinite(n) ? n : Number.NaN;
}

export function CampaignForm() {
  const router = useRouter();
  const [name, setName] = useState('');
  const [objective, setObjective] = useState('');
  const [trialMinutes, setTrialMinutes] = useState('20');
  const [factors, setFactors] = useState<FactorDraft[]>([newFactor()]);
  const [responses, setResponses] = useState<ResponseDraft[]>([newResponse()]);
  const [robots, setRobots] = useState<RobotDraft[]>([{ name: '', massGrams: '', heightMm: '' }]);
  const [rigs, setRigs] = useState<RigDraft[]>([{ name: '', timeZone: 'UTC', startTime: '09:00', endTime: '17:00' }]);
  const [error, setError] = useState<ApiError | null>(null);
  const [busy, setBusy] = useState(false);

  function body() {
    return {
      name,
      objective,
      trialMinutes: num(trialMinutes),
      factors: factors.map((f) => {
        const base = { name: f.name, unit: f.unit, hardToChange: f.hardToChange, changeMinutes: num(f.changeMinutes) ?? 0 };
        if (f.kind === 'continuous') return { ...base, kind: f.kind, low: num(f.low), high: num(f.high) };
        const items = f.list.split(',').map((s) => s.trim()).filter(Boolean);
        if (f.kind === 'discrete') return { ...base, kind: f.kind, values: items.map(Number) };
        return { ...base, kind: f.kind, levels: items };
      }),
      responses: responses.map((r) => ({ name: r.name, unit: r.unit, goal: r.goal, target: r.goal === 'target' ? num(r.target) : undefined })),
      robots: robots.filter((r) => r.name.trim() !== '').map((r) => ({ name: r.name, massGrams: num(r.massGrams), heightMm: num(r.heightMm) })),
      rigs: rigs.filter((r) => r.name.trim() !== '').map((r) => ({ name: r.name, timeZone: r.timeZone, startTime: r.startTime, endTime: r.endTime })),
    };
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    const draft = body();
    const check = campaignCreateSchema.safeParse(draft);
    if (!check.success) {
      const issue = check.error.issues[0]!;
      const field = issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('').replace(/^\./, '');
      setError({ code: 'invalid_input', field, message: issue.message });
      return;
    }
    setBusy(true);
    const res = await postJson<{ id: string }>('/api/v1/campaigns', draft);
    setBusy(false);
    if (!res.ok) return setError(res.error);
    router.push(`/campaigns/${res.data.id}`);
  }

  const bad = (field: string) => (error?.field === field ? true : undefined);
  const upd = <T,>(list: T[], set: (v: T[]) => void, i: number, patch: Partial<T>) => set(list.map((x, j) => (j === i ? { ...x, ...patch } : x)));

  return (
    <form onSubmit={submit} noValidate>
      <div className="panel">
        <div className="row">
          <div>
            <label htmlFor="c-name">Campaign name</label>
            <input id="c-name" name="name" value={name} onChange={(e) => setName(e.target.value)} aria-invalid={bad('name')} />
          </div>
          <div className="narrow">
            <label htmlFor="c-minutes">Minutes per trial</label>
            <input id="c-minutes" name="trialMinutes" inputMode="numeric" value={trialMinutes} onChange={(e) => setTrialMinutes(e.target.value)} aria-invalid={bad('trialMinutes')} />
          </div>
        </div>
        <label htmlFor="c-objective">Objective</label>
        <textarea id="c-objective" name="objective" rows={2} value={objective} onChange={(e) => setObjective(e.target.value)} />
      </div>

      <div className="panel">
        <h2 style={{ marginTop: 0 }}>Factors</h2>
        <p className="muted">Continuous factors take a low and a high; discrete factors a list of numbers; categorical factors a list of levels. Mark a factor hard to change when changing it is slow (a surface bed swap) and give the minutes a change costs.</p>
        {factors.map((f, i) => (
          <div className="row" key={i} style={{ marginBottom: '0.6rem' }}>
            <div>
              <label htmlFor={`f${i}-name`}>Factor {i + 1} name</label>
              <input id={`f${i}-name`} value={f.name} onChange={(e) => upd(factors, setFactors, i, { name: e.target.value })} aria-invalid={bad(`factors[${i}].name`)} />
            </div>
            <div className="narrow">
              <label htmlFor={`f${i}-kind`}>Factor {i + 1} kind</label>
              <select id={`f${i}-kind`} value={f.kind} onChange={(e) => upd(factors, setFactors, i, { kind: e.target.value as FactorDraft['kind'] })}>
                <option value="continuous">continuous</option>
                <option value="discrete">discrete</option>
                <option value="categorical">categorical</option>
              </select>
            </div>
            {f.kind === 'continuous' ? (
              <>
                <div className="narrow">
                  <label htmlFor={`f${i}-low`}>Factor {i + 1} low</label>
                  <input id={`f${i}-low`} inputMode="decimal" value={f.low} onChange={(e) => upd(factors, setFactors, i, { low: e.target.value })} aria-invalid={bad(`factors[${i}].low`)} />
                </div>
                <div className="narrow">
                  <label htmlFor={`f${i}-high`}>Factor {i + 1} high</label>
                  <input id={`f${i}-high`} inputMode="decimal" value={f.high} onChange={(e) => upd(factors, setFactors, i, { high: e.target.value })} aria-invalid={bad(`factors[${i}].high`)} />
                </div>
              </>
            ) : (
              <div>
                <label htmlFor={`f${i}-list`}>Factor {i + 1} {f.kind === 'discrete' ? 'values' : 'levels'} (comma-separated)</label>
                <input id={`f${i}-list`} value={f.list} onChange={(e) => upd(factors, setFactors, i, { list: e.target.value })} aria-invalid={bad(`factors[${i}].${f.kind === 'discrete' ? 'values' : 'levels'}`)} />
              </div>
            )}
            <div className="narrow">
              <label htmlFor={`f${i}-unit`}>Factor {i + 1} unit</label>
              <input id={`f${i}-unit`} value={f.unit} onChange={(e) => upd(factors, setFactors, i, { unit: e.target.value })} />
            </div>
            <div className="narrow">
              <label htmlFor={`f${i}-htc`}>
                <input id={`f${i}-htc`} type="checkbox" checked={f.hardToChange} onChange={(e) => upd(factors, setFactors, i, { hardToChange: e.target.checked })} /> Factor {i + 1} hard to change
              </label>
            </div>
            {f.hardToChange ? (
              <div className="narrow">
                <label htmlFor={`f${i}-change`}>Factor {i + 1} change minutes</label>
                <input id={`f${i}-change`} inputMode="numeric" value={f.changeMinutes} onChange={(e) => upd(factors, setFactors, i, { changeMinutes: e.target.value })} />
              </div>
            ) : null}
            {factors.length > 1 ? (
              <button type="button" className="btn secondary" onClick={() => setFactors(factors.filter((_, j) => j !== i))} aria-label={`Remove factor ${i + 1}`}>
                Remove
              </button>
            ) : null}
          </div>
        ))}
        <button type="button" className="btn secondary" onClick={() => setFactors([...factors, newFactor()])}>
          Add factor
        </button>
      </div>

      <div className="panel">
        <h2 style={{ marginTop: 0 }}>Responses</h2>
        {responses.map((r, i) => (
          <div className="row" key={i} style={{ marginBottom: '0.6rem' }}>
            <div>
              <label htmlFor={`r${i}-name`}>Response {i + 1} name</label>
              <input id={`r${i}-name`} value={r.name} onChange={(e) => upd(responses, setResponses, i, { name: e.target.value })} aria-invalid={bad(`responses[${i}].name`)} />
            </div>
            <div className="narrow">
              <label htmlFor={`r${i}-unit`}>Response {i + 1} unit</label>
              <input id={`r${i}-unit`} value={r.unit} onChange={(e) => upd(responses, setResponses, i, { unit: e.target.value })} />
            </div>
            <div className="narrow">
              <label htmlFor={`r${i}-goal`}>Response {i + 1} goal</label>
              <select id={`r${i}-goal`} value={r.goal} onChange={(e) => upd(responses, setResponses, i, { goal: e.target.value as ResponseDraft['goal'] })}>
                <option value="maximize">maximise</option>
                <option value="minimize">minimise</option>
                <option value="target">hit a target</option>
              </select>
            </div>
            {r.goal === 'target' ? (
              <div className="narrow">
                <label htmlFor={`r${i}-target`}>Response {i + 1} target</label>
                <input id={`r${i}-target`} inputMode="decimal" value={r.target} onChange={(e) => upd(responses, setResponses, i, { target: e.target.value })} aria-invalid={bad(`responses[${i}].target`)} />
              </div>
            ) : null}
            {responses.length > 1 ? (
              <button type="button" className="btn secondary" onClick={() => setResponses(responses.filter((_, j) => j !== i))} aria-label={`Remove response ${i + 1}`}>
                Remove
              </button>
            ) : null}
          </div>
        ))}
        <button type="button" className="btn secondary" onClick={() => setResponses([...responses, newResponse()])}>
          Add response
        </button>{' '}
        <button
          type="button"
          className="btn secondary"
          onClick={() => {
            const kept = responses.filter((r) => r.name.trim() !== '');
            const missing = STANDARD_READINGS.filter((s) => !kept.some((r) => r.name === s.name));
            setResponses([...kept, ...missing]);
          }}
        >
          Add the standard rig readings
        </button>
        <p className="muted">Standard rig readings: apex height (mm), hops completed, distance travelled (mm), electrical energy drawn (mJ); the rig log checks them for plausibility.</p>
      </div>

      <div className="grid2">
        <div className="panel">
          <h2 style={{ marginTop: 0 }}>Robots</h2>
          {robots.map((r, i) => (
            <div className="row" key={i}>
              <div>
                <label htmlFor={`rb${i}-name`}>Robot {i + 1} name</label>
                <input id={`rb${i}-name`} value={r.name} onChange={(e) => upd(robots, setRobots, i, { name: e.target.value })} aria-invalid={bad(`robots[${i}].name`)} />
              </div>
              <div className="narrow">
                <label htmlFor={`rb${i}-mass`}>Robot {i + 1} mass (g)</label>
                <input id={`rb${i}-mass`} inputMode="decimal" value={r.massGrams} onChange={(e) => upd(robots, setRobots, i, { massGrams: e.target.value })} aria-invalid={bad(`robots[${i}].massGrams`)} />
              </div>
              <div className="narrow">
                <label htmlFor={`rb${i}-height`}>Robot {i + 1} height (mm)</label>
                <input id={`rb${i}-height`} inputMode="decimal" value={r.heightMm} onChange={(e) => upd(robots, setRobots, i, { heightMm: e.target.value })} />
              </div>
            </div>
          ))}
          <button type="button" className="btn secondary" onClick={() => setRobots([...robots, { name: '', massGrams: '', heightMm: '' }])}>
            Add robot
          </button>
        </div>
        <div className="panel">
          <h2 style={{ marginTop: 0 }}>Rigs</h2>
          {rigs.map((r, i) => (
            <div className="row" key={i}>
              <div>
                <label htmlFor={`rg${i}-name`}>Rig {i + 1} name</label>
                <input id={`rg${i}-name`} value={r.name} onChange={(e) => upd(rigs, setRigs, i, { name: e.target.value })} aria-invalid={bad(`rigs[${i}].name`)} />
              </div>
              <div>
                <label htmlFor={`rg${i}-tz`}>Rig {i + 1} time zone</label>
                <input id={`rg${i}-tz`} value={r.timeZone} onChange={(e) => upd(rigs, setRigs, i, { timeZone: e.target.value })} aria-invalid={bad(`rigs[${i}].timeZone`)} />
              </div>
              <div className="narrow">
                <label htmlFor={`rg${i}-start`}>Rig {i + 1} opens</label>
                <input id={`rg${i}-start`} value={r.startTime} onChange={(e) => upd(rigs, setRigs, i, { startTime: e.target.value })} aria-invalid={bad(`rigs[${i}].startTime`)} />
              </div>
              <div className="narrow">
                <label htmlFor={`rg${i}-end`}>Rig {i + 1} closes</label>
                <input id={`rg${i}-end`} value={r.endTime} onChange={(e) => upd(rigs, setRigs, i, { endTime: e.target.value })} aria-invalid={bad(`rigs[${i}].endTime`)} />
              </div>
            </div>
          ))}
          <button type="button" className="btn secondary" onClick={() => setRigs([...rigs, { name: '', timeZone: 'UTC', startTime: '09:00', endTime: '17:00' }])}>
            Add rig
          </button>
        </div>
      </div>

      <ErrorBox error={error} />
      <button type="submit" className="btn" disabled={busy}>
        {busy ? 'Creating…' : 'Create campaign'}
      </button>
    </form>
  );
}
