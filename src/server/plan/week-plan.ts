/**
 * The stored plan of a campaign as the scheduler's request and result, so the week grid, day sheets,
 * iCalendar files and manual moves can use the schedule engine on what is stored. Slots are stored per
 * run; changeovers and upkeep are not stored, so they are derived here from consecutive trials on a rig.
 * Pure: no database, no clock.
 */
import { DomainError } from '@/domain/errors';
import {
  dayInZone,
  validateManualMove,
  workingAvailability,
  type Assignment,
  type ManualMove,
  type MoveCheck,
  type LevelValue,
  type RigActivity,
  type ScheduleRequest,
  type ScheduleResult,
  type TimeInterval,
} from '@/domain/schedule';

export interface PlanRig {
  id: string;
  name: string;
  timeZone: string;
  workdays: number[];
  startTime: string;
  endTime: string;
}

export interface PlanRun {
  id: string;
  runNumber: number;
  values: Record<string, LevelValue>;
  wholePlot: number | null;
  block: number | null;
  /** planned, scheduled, running, done, failed, skipped */
  state: string;
  slot: { rigId: string; start: string; end: string } | null;
}

export interface PlanInput {
  rigs: PlanRig[];
  runs: PlanRun[];
  /** Minutes a level change costs, per hard-to-change factor. */
  changeoverMinutes: Record<string, number>;
  trialMinutes: number;
  /** First calendar day of the rigs' hours (yyyy-MM-dd); defaults to the day of the first slot. */
  from?: string;
  /** Calendar days of rig hours to lay out (default: up to two weeks past the last slot, at most 62). */
  days?: number;
  /** Today (yyyy-MM-dd), used when nothing is placed yet. */
  today: string;
}

export interface PlanView {
  request: ScheduleRequest;
  result: ScheduleResult;
  /** First day of the rigs' hours in the request. */
  from: string;
  /** The day of the first untried placed run (else `from`): where the week grid opens. */
  firstOpenDay: string;
  days: number;
  /** Schedule run id (the run number as text) → stored run. */
  runsById: Map<string, PlanRun>;
  rigsByName: Map<string, PlanRig>;
}

/** Only runs not yet tried may move; tried ones keep their place and are not grouped into whole plots. */
export const MOVABLE_STATES: ReadonlySet<string> = new Set(['planned', 'scheduled']);

/** The schedule id of a stored run: its run number, so messages and calendars read "Trial 12". */
export const scheduleRunId = (run: Pick<PlanRun, 'runNumber'>): string => String(run.runNumber);

/** Changeovers between consecutive trials of each rig: ending where the trial starts, or right after the trial before when a break lies between. */
export function deriveActivities(request: ScheduleRequest, assignments: readonly Assignment[]): RigActivity[] {
  const runs = new Map(request.runs.map((r) => [r.id, r]));
  const minutes = request.changeoverMinutes ?? {};
  const factors = Object.keys(minutes).filter((f) => (minutes[f] ?? 0) > 0);
  const out: RigActivity[] = [];
  for (const rig of request.rigs) {
    const intervals = rig.available.map((a) => ({ start: Date.parse(a.start), end: Date.parse(a.end) }));
    const mine = assignments.filter((a) => a.rig === rig.name).sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
    let prev: { values: Record<string, LevelValue>; end: number } | null = null;
    for (const a of mine) {
      const run = runs.get(a.runId);
      const start = Date.parse(a.start);
      if (!run) continue;
      if (prev) {
        const changes = factors
          .filter((f) => run.values[f] !== undefined && prev!.values[f] !== undefined && String(run.values[f]) !== String(prev!.values[f]))
          .map((f) => ({ factor: f, from: prev!.values[f]!, to: run.values[f]! }));
        if (changes.length > 0) {
          const ms = changes.reduce((s, c) => s + minutes[c.factor]! * 60_000, 0);
          const interval = intervals.find((iv) => iv.start <= start && start < iv.end);
          const earliest = Math.max(prev.end, interval?.start ?? -Infinity);
          const begin = start - ms >= earliest ? start - ms : prev.end;
          out.push({ rig: rig.name, kind: 'changeover', start: new Date(begin).toISOString(), end: new Date(begin + ms).toISOString(), beforeRunId: a.runId, changes });
        }
      }
      prev = { values: run.values, end: Date.parse(a.end) };
    }
  }
  return out.sort((x, y) => Date.parse(x.start) - Date.parse(y.start) || x.rig.localeCompare(y.rig));
}

/** Summary figures of a result from its assignments and activities (no bounds: the plan may have been edited by hand). */
export function summarise(assignments: Assignment[], activities: RigActivity[], available: TimeInterval[], unscheduled: ScheduleResult['unscheduled']): ScheduleResult {
  const changeoverActs = activities.filter((a) => a.kind === 'changeover');
  const changeoverMinutesTotal = changeoverActs.reduce((s, a) => s + (Date.parse(a.end) - Date.parse(a.start)) / 60_000, 0);
  const first = Math.min(...available.map((a) => Date.parse(a.start)), ...assignments.map((a) => Date.parse(a.start)));
  const last = Math.max(...assignments.map((a) => Date.parse(a.end)));
  const makespanMinutes = assignments.length ? (last - first) / 60_000 : 0;
  return {
    assignments,
    activities,
    changeovers: changeoverActs.reduce((s, a) => s + (a.changes?.length ?? 0), 0),
    changeoverMinutesTotal,
    makespanMinutes,
    lowerBound: { changeovers: 0, makespanMinutes: 0 },
    gap: { changeovers: 0, makespanMinutes: 0 },
    unscheduled,
    notes: ['derived from the stored plan; lower bounds are not computed for a plan edited by hand'],
  };
}

/** Build the scheduler's request and result from the stored rigs, runs and slots. */
export function planView(input: PlanInput): PlanView {
  const zone = input.rigs[0]?.timeZone ?? 'UTC';
  const rigById = new Map(input.rigs.map((r) => [r.id, r]));
  const slotted = input.runs.filter((r) => r.slot && rigById.has(r.slot.rigId));
  const starts = slotted.map((r) => Date.parse(r.slot!.start));
  const ends = slotted.map((r) => Date.parse(r.slot!.end));
  const from = input.from ?? (starts.length ? dayInZone(Math.min(...starts), zone) : input.today);
  const lastDay = ends.length ? dayInZone(Math.max(...ends), zone) : from;
  const span = Math.round((Date.parse(`${lastDay}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000) + 1;
  const days = input.days ?? Math.min(62, Math.max(7, span + 14));

  const runsById = new Map<string, PlanRun>();
  const request: ScheduleRequest = {
    runs: slotted.map((r) => {
      const id = scheduleRunId(r);
      runsById.set(id, r);
      const movable = MOVABLE_STATES.has(r.state);
      return {
        id,
        values: r.values,
        durationMinutes: Math.max(1, Math.round((Date.parse(r.slot!.end) - Date.parse(r.slot!.start)) / 60_000)),
        ...(movable && r.wholePlot !== null ? { wholePlot: r.wholePlot } : {}),
        ...(r.block !== null ? { block: r.block } : {}),
      };
    }),
    rigs: input.rigs.map((r) => ({
      name: r.name,
      available: workingAvailability({ workdays: r.workdays, startTime: r.startTime, endTime: r.endTime, timeZone: r.timeZone }, from, days),
    })),
    changeoverMinutes: input.changeoverMinutes,
    defaultDurationMinutes: input.trialMinutes,
    timeZone: zone,
  };
  const assignments: Assignment[] = slotted
    .map((r) => ({ runId: scheduleRunId(r), rig: rigById.get(r.slot!.rigId)!.name, start: new Date(r.slot!.start).toISOString(), end: new Date(r.slot!.end).toISOString() }))
    .sort((a, b) => Date.parse(a.start) - Date.parse(b.start) || a.rig.localeCompare(b.rig));
  const unscheduled = input.runs.filter((r) => !r.slot && MOVABLE_STATES.has(r.state)).map((r) => ({ runId: scheduleRunId(r), reason: 'not placed yet' }));
  const result = summarise(assignments, deriveActivities(request, assignments), request.rigs.flatMap((r) => r.available), unscheduled);
  const open = slotted.filter((r) => MOVABLE_STATES.has(r.state)).map((r) => Date.parse(r.slot!.start));
  const firstOpenDay = open.length ? dayInZone(Math.min(...open), zone) : from;
  return { request, result, from, firstOpenDay, days, runsById, rigsByName: new Map(input.rigs.map((r) => [r.name, r])) };
}

const FIELD_OF_PROBLEM: Record<MoveCheck['problems'][number]['code'], string> = {
  unknown: 'wholePlot',
  split_whole_plot: 'runOrder',
  reordered_whole_plot: 'runOrder',
  overlap: 'start',
  outside_hours: 'start',
  changeover_gap: 'start',
  block_day: 'start',
};

/**
 * Check a move on the stored plan with the schedule engine. Refused moves throw a DomainError naming
 * the field at fault (runOrder for a re-sorted whole plot, start for a clash); tried runs never move.
 */
export function checkMove(view: PlanView, move: ManualMove): MoveCheck {
  const ids = move.wholePlot !== undefined
    ? view.request.runs.filter((r) => r.wholePlot !== undefined && String(r.wholePlot) === String(move.wholePlot)).map((r) => r.id)
    : move.runId !== undefined
      ? [move.runId]
      : [];
  if (ids.length === 0) {
    const tried = move.runId !== undefined && view.runsById.has(move.runId);
    throw new DomainError(
      'invalid_input',
      tried ? `run ${move.runId} has already been tried (or started); only planned runs move` : move.wholePlot !== undefined ? `no untried whole plot "${String(move.wholePlot)}" is placed in this plan` : 'name the whole plot (or the run) to move',
      move.runId !== undefined ? 'runId' : 'wholePlot',
    );
  }
  for (const id of ids) {
    const run = view.runsById.get(id);
    if (run && !MOVABLE_STATES.has(run.state)) throw new DomainError('invalid_input', `run ${id} has already been tried (or started); only planned runs move`, 'runId');
  }
  const check = validateManualMove(view.request, view.result, move);
  if (!check.ok) {
    const first = check.problems[0]!;
    const field =
      first.code === 'unknown' && first.message.startsWith('no rig')
        ? 'rig'
        : first.code === 'split_whole_plot' && move.runOrder === undefined
          ? 'runId'
          : FIELD_OF_PROBLEM[first.code];
    const code = first.code === 'reordered_whole_plot' || first.code === 'split_whole_plot' || first.code === 'unknown' ? 'invalid_input' : 'conflict';
    throw new DomainError(code, check.problems.map((p) => p.message).join(' '), field, { problems: check.problems });
  }
  return check;
}
