/**
 * Exact search for small instances: every order of the units and every rig for each, explored
 * depth-first with pruning. Unplaced runs, changeovers and the finish time only grow as a partial
 * plan is extended, so a partial plan no better than the best complete one is cut
 * (branch and bound; Land & Doig 1960).
 */
import type { Prepared, Unit } from './prepare';
import { placeUnit, type RigState } from './rig-timeline';
import type { RigPlan } from './sequential';

/** Leaves of the full search tree (units! × rigs^units); the solver uses exact search below a limit. */
export function exactSearchSize(units: number, rigs: number): number {
  let size = 1;
  for (let k = 1; k <= units; k++) size *= k * rigs;
  return size;
}

type Score = [unplacedRuns: number, changes: number, finish: number];

function worse(a: Score, b: Score): boolean {
  // a is no better than b
  if (a[0] !== b[0]) return a[0] > b[0];
  if (a[1] !== b[1]) return a[1] > b[1];
  return a[2] >= b[2];
}

export function exactPlan(p: Prepared, units: readonly Unit[], initial: readonly RigState[]): RigPlan {
  const n = units.length;
  const used = new Array<boolean>(n).fill(false);
  let best: { score: Score; states: RigState[]; unplaced: Unit[] } | undefined;

  const visit = (states: RigState[], unplaced: Unit[], score: Score, depth: number) => {
    if (best && worse(score, best.score)) return;
    if (depth === n) {
      best = { score, states, unplaced };
      return;
    }
    for (let i = 0; i < n; i++) {
      if (used[i]) continue;
      const unit = units[i]!;
      used[i] = true;
      let placedSomewhere = false;
      for (let r = 0; r < states.length; r++) {
        if (unit.rigIndex !== undefined && unit.rigIndex !== r) continue;
        const next = placeUnit(states[r]!, unit, p);
        if (!next) continue;
        placedSomewhere = true;
        const nextStates = states.slice();
        nextStates[r] = next;
        visit(nextStates, unplaced, [score[0], score[1] + next.changes - states[r]!.changes, Math.max(score[2], next.lastEnd)], depth + 1);
      }
      // Leaving a unit out is allowed (it is reported as unscheduled), but never better than placing it.
      if (!placedSomewhere) visit(states, [...unplaced, unit], [score[0] + unit.runs.length, score[1], score[2]], depth + 1);
      used[i] = false;
    }
  };
  visit(initial.slice(), [], [0, 0, Math.max(-Infinity, ...initial.map((s) => s.lastEnd))], 0);
  return { states: best!.states, unplaced: best!.unplaced, notes: [] };
}
