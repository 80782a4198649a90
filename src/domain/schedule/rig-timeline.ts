/**
 * One rig's timeline, filled front to back: each trial goes at the earliest instant after the
 * previous one where its upkeep, its changeover and the trial itself fit inside one available
 * interval (and inside its block's day, when pinned), with the cool-down respected.
 */
import type { MsInterval } from './calendar';
import type { Prepared, PreparedRig, PreparedRun, Unit } from './prepare';

export interface PlacedActivity {
  kind: 'changeover' | 'upkeep';
  start: number;
  end: number;
  /** Indices into `Prepared.changeoverFactors` whose level changes (changeover only). */
  factors?: number[];
}

export interface Placement {
  run: PreparedRun;
  rig: number;
  start: number;
  end: number;
  activities: PlacedActivity[];
  /** Level changes of factors with a positive changeover time. */
  changes: number;
  /** Previous levels (for reporting from → to). */
  previousLevels: (string | undefined)[];
}

export interface RigState {
  rig: PreparedRig;
  /** First interval that may still hold work. */
  intervalIndex: number;
  /** Earliest instant new work may start (end of the last trial). */
  cursor: number;
  lastEnd: number;
  lastLevels: (string | undefined)[];
  trialsSinceUpkeep: number;
  msSinceUpkeep: number;
  placements: Placement[];
}

export function emptyRigState(rig: PreparedRig): RigState {
  return {
    rig,
    intervalIndex: 0,
    cursor: -Infinity,
    lastEnd: -Infinity,
    lastLevels: [],
    trialsSinceUpkeep: 0,
    msSinceUpkeep: 0,
    placements: [],
  };
}

/** Copy that shares the (append-only) placements prefix. */
export function cloneRigState(s: RigState): RigState {
  return { ...s, lastLevels: s.lastLevels.slice(), placements: s.placements.slice() };
}

/** Place one run at the end of the timeline; mutates `state`. Returns false when it does not fit. */
export function placeRun(state: RigState, run: PreparedRun, p: Prepared, window?: MsInterval): boolean {
  const changed: number[] = [];
  let changeMs = 0;
  let changes = 0;
  p.changeoverFactors.forEach((f, k) => {
    const prev = state.lastLevels[k];
    if (prev !== undefined && prev !== run.levels[k]) {
      changed.push(k);
      changeMs += f.ms;
      if (f.ms > 0) changes++;
    }
  });
  const u = p.upkeep;
  const upkeepDue =
    u !== undefined &&
    u.ms > 0 &&
    state.trialsSinceUpkeep > 0 &&
    (state.trialsSinceUpkeep >= u.everyTrials || state.msSinceUpkeep + run.durationMs > u.everyMs);
  const upkeepMs = upkeepDue ? u.ms : 0;
  const setupMs = upkeepMs + changeMs;

  const intervals = state.rig.intervals;
  for (let i = state.intervalIndex; i < intervals.length; i++) {
    const iv = intervals[i]!;
    if (iv.end <= state.cursor) continue;
    if (window && iv.start >= window.end) return false;
    const setupStart = Math.max(state.cursor, iv.start, window ? window.start : -Infinity);
    const start = Math.max(setupStart + setupMs, state.lastEnd + p.cooldownMs);
    const end = start + run.durationMs;
    const limit = window ? Math.min(iv.end, window.end) : iv.end;
    if (end > limit) continue;

    const activities: PlacedActivity[] = [];
    let t = start - setupMs;
    if (upkeepMs > 0) {
      activities.push({ kind: 'upkeep', start: t, end: t + upkeepMs });
      t += upkeepMs;
    }
    if (changed.length > 0 && changeMs > 0) activities.push({ kind: 'changeover', start: t, end: t + changeMs, factors: changed });
    state.placements.push({ run, rig: state.rig.index, start, end, activities, changes, previousLevels: state.lastLevels.slice() });
    state.intervalIndex = i;
    state.cursor = end;
    state.lastEnd = end;
    state.lastLevels = run.levels.slice();
    if (upkeepDue) {
      state.trialsSinceUpkeep = 0;
      state.msSinceUpkeep = 0;
    }
    state.trialsSinceUpkeep++;
    state.msSinceUpkeep += run.durationMs;
    return true;
  }
  return false;
}

/** Place a whole unit (its runs back to back, in order) on a copy of `state`; null when it does not fit. */
export function placeUnit(state: RigState, unit: Unit, p: Prepared): RigState | null {
  const next = cloneRigState(state);
  for (const run of unit.runs) {
    if (!placeRun(next, run, p, unit.window)) return null;
  }
  return next;
}
