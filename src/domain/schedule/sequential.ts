/** Sequential fill: the simplest plan, and the fallback the grouped solver is compared against. */
import type { Prepared, Unit } from './prepare';
import { emptyRigState, placeUnit, type RigState } from './rig-timeline';

/** Outcome of a strategy: one timeline per rig and the units that found no place. */
export interface RigPlan {
  states: RigState[];
  unplaced: Unit[];
  notes: string[];
}

/**
 * Sequential fill: whole plots (and loose runs) in design order, each onto the rig where it would
 * finish first (list scheduling; ties go to fewer changeover minutes, then to the earlier rig).
 */
export function sequentialFill(p: Prepared, units: readonly Unit[] = p.units, initial?: RigState[]): RigPlan {
  const states = initial ?? p.rigs.map(emptyRigState);
  const unplaced: Unit[] = [];
  for (const unit of units) {
    let best: { state: RigState; rig: number; end: number } | undefined;
    for (let r = 0; r < states.length; r++) {
      if (unit.rigIndex !== undefined && unit.rigIndex !== r) continue;
      const next = placeUnit(states[r]!, unit, p);
      if (!next) continue;
      const end = next.lastEnd;
      if (!best || end < best.end) best = { state: next, rig: r, end };
    }
    if (best) states[best.rig] = best.state;
    else unplaced.push(unit);
  }
  return { states, unplaced, notes: [] };
}

