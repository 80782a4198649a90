/**
 * One rig's timeline, filled front to back: each trial goes at the earliest instant after the
 * previous one where it fits inside an available interval (and inside its block's day, when pinned),
 * after its upkeep and changeover (each inside an available interval, possibly an earlier one, e.g. a
 * surface swap at the end of the day) and after the cool-down.
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
  /** Previous levels (for reporting from → to). Level arrays are shared and never changed in place. */
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
  /** Placements as a persistent list (newest last), so copies of a state share their history. */
  tail: PlacementNode | null;
  count: number;
  /** Level changes so far (factors with a positive changeover time). */
  changes: number;
}

export interface PlacementNode {
  placement: Placement;
  prev: PlacementNode | null;
}

/** The placements of a state, oldest first. */
export function placementsOf(state: RigState): Placement[] {
  const out = new Array<Placement>(state.count);
  let node = state.tail;
  for (let i = state.count - 1; i >= 0 && node; i--, node = node.prev) out[i] = node.placement;
  return out;
}

/** Append a placement to a state's history (mutates the state, never the shared history). */
export function pushPlacement(state: RigState, placement: Placement): void {
  state.tail = { placement, prev: state.tail };
  state.count++;
  state.changes += placement.changes;
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
    tail: null,
    count: 0,
    changes: 0,
  };
}

/** Copy that shares the placement history (appending to the copy leaves the original as it was). */
export function cloneRigState(s: RigState): RigState {
  return { ...s };
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
  const lo = window ? window.start : -Infinity;
  const hi = window ? window.end : Infinity;
  // Setup (upkeep, then changeover) goes in the first interval with room for it; the trial follows in
  // the same interval or a later one. A setup of zero length sits right before the trial.
  for (let i = state.intervalIndex; i < intervals.length; i++) {
    const iv = intervals[i]!;
    if (iv.end <= state.cursor) continue;
    if (iv.start >= hi) return false;
    const setupStart = Math.max(state.cursor, iv.start, lo);
    if (setupStart + setupMs > Math.min(iv.end, hi)) continue;
    const setupEnd = setupStart + setupMs;
    for (let j = i; j < intervals.length; j++) {
      const jv = intervals[j]!;
      if (jv.start >= hi) return false;
      const start = Math.max(setupEnd, state.lastEnd + p.cooldownMs, jv.start);
      const end = start + run.durationMs;
      if (end > Math.min(jv.end, hi)) continue;
      const activities: PlacedActivity[] = [];
      // With the trial in the same interval the setup runs straight into it; otherwise it closes the earlier interval's work.
      let t = j === i ? start - setupMs : setupStart;
      if (upkeepMs > 0) {
        activities.push({ kind: 'upkeep', start: t, end: t + upkeepMs });
        t += upkeepMs;
      }
      if (changed.length > 0 && changeMs > 0) activities.push({ kind: 'changeover', start: t, end: t + changeMs, factors: changed });
      pushPlacement(state, { run, rig: state.rig.index, start, end, activities, changes, previousLevels: state.lastLevels });
      state.intervalIndex = j;
      state.cursor = end;
      state.lastEnd = end;
      state.lastLevels = run.levels;
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
