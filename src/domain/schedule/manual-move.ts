/**
 * Checking a move the user makes on the week grid: a whole plot dragged to another rig or time.
 * A whole plot moves as one piece and its runs keep the design's order.
 */
import { parseInstant } from './calendar';
import { prepare } from './prepare';
import { emptyRigState, placementsOf, placeRun } from './rig-timeline';
import type { Assignment, ScheduleRequest, ScheduleResult } from './types';

export interface ManualMove {
  /** The whole plot to move; for a run outside any whole plot give `runId` instead. */
  wholePlot?: string | number;
  runId?: string;
  /** Target rig and the instant the moved work (its changeover first, if any) begins. */
  rig: string;
  start: string;
  /** The run order the user asks for inside the whole plot (run ids); it must be the design's order. */
  runOrder?: string[];
}

export type MoveProblemCode = 'unknown' | 'split_whole_plot' | 'reordered_whole_plot' | 'overlap' | 'outside_hours' | 'changeover_gap' | 'block_day';

export interface MoveCheck {
  ok: boolean;
  problems: { code: MoveProblemCode; message: string }[];
  /** Where the moved runs would go (design order, changeovers and cool-down respected). */
  moved: Assignment[];
  /** The whole schedule with the move applied (other trials unchanged), sorted by start. */
  assignments: Assignment[];
}

// Ganju & Lucas (1999), Journal of Statistical Planning and Inference 81:129-140 (details from memory)
export const RANDOMISATION_RESTRICTION_MESSAGE =
  'the order of runs inside a whole plot is part of the design’s randomisation; sorting them by convenience turns ' +
  'the randomised order into an unplanned split-plot structure, and the analysis would then under- or overstate ' +
  'effects (Ganju & Lucas 1999). Move the whole plot as it is, or change the design.';

/** Validate a manual move against the request and the current result. Pure: nothing is changed. */
export function validateManualMove(request: ScheduleRequest, result: ScheduleResult, move: ManualMove): MoveCheck {
  const p = prepare(request);
  const problems: MoveCheck['problems'] = [];
  const fail = (code: MoveProblemCode, message: string): MoveCheck => ({ ok: false, problems: [...problems, { code, message }], moved: [], assignments: result.assignments });

  const rigIndex = p.rigs.findIndex((r) => r.name === move.rig);
  if (rigIndex < 0) return fail('unknown', `no rig is named "${move.rig}"`);
  let unit = p.units.find((u) => move.wholePlot !== undefined && u.key === `wp:${String(move.wholePlot)}`);
  if (!unit && move.runId !== undefined) {
    const run = p.runs.find((r) => r.id === move.runId);
    if (!run) return fail('unknown', `no run has the id "${move.runId}"`);
    unit = p.units.find((u) => u.runs.includes(run))!;
    if (unit.runs.length > 1) {
      return fail('split_whole_plot', `run ${run.id} belongs to ${unit.label}; a whole plot stays together on one rig, so move the whole plot`);
    }
  }
  if (!unit) return fail('unknown', `no whole plot "${String(move.wholePlot)}" in this campaign`);

  const designOrder = unit.runs.map((r) => r.id);
  if (move.runOrder) {
    const same = move.runOrder.length === designOrder.length && move.runOrder.every((id, i) => id === designOrder[i]);
    if (!same) {
      const sameSet = move.runOrder.length === designOrder.length && designOrder.every((id) => move.runOrder!.includes(id));
      problems.push(
        sameSet
          ? { code: 'reordered_whole_plot', message: `${unit.label}: runs asked in the order ${move.runOrder.join(', ')}, but ${RANDOMISATION_RESTRICTION_MESSAGE} Design order: ${designOrder.join(', ')}.` }
          : { code: 'split_whole_plot', message: `${unit.label} has the runs ${designOrder.join(', ')}; all of them move together` },
      );
    }
  }

  const startMs = parseInstant(move.start, 'start');
  const movedIds = new Set(designOrder);
  const byId = new Map(p.runs.map((r) => [r.id, r]));
  const others = result.assignments
    .filter((a) => a.rig === move.rig && !movedIds.has(a.runId))
    .map((a) => ({ a, start: Date.parse(a.start), end: Date.parse(a.end) }))
    .sort((x, y) => x.start - y.start);
  const before = others.filter((o) => o.end <= startMs).at(-1);
  const overlapping = others.filter((o) => o.start < startMs && o.end > startMs);
  for (const o of overlapping) problems.push({ code: 'overlap', message: `trial ${o.a.runId} on ${move.rig} runs until ${o.a.end}, after the chosen start` });

  // Lay the runs out from the chosen start as the solver would, following the trial before.
  const state = emptyRigState(p.rigs[rigIndex]!);
  state.cursor = startMs;
  if (before) {
    state.lastEnd = before.end;
    state.lastLevels = byId.get(before.a.runId)!.levels.slice();
  }
  const window = unit.window;
  for (const run of unit.runs) {
    if (!placeRun(state, run, p)) {
      problems.push({ code: 'outside_hours', message: `${unit.label} does not fit into ${move.rig}'s hours from ${move.start}` });
      break;
    }
  }
  const placed = placementsOf(state);
  const moved: Assignment[] = placed.map((x) => ({ runId: x.run.id, rig: move.rig, start: new Date(x.start).toISOString(), end: new Date(x.end).toISOString() }));
  if (placed.length === unit.runs.length) {
    const lastMoved = placed[placed.length - 1]!;
    const blockEnd = lastMoved.end;
    const blockBegin = Math.min(...placed.flatMap((x) => [x.start, ...x.activities.map((a) => a.start)]));
    for (const o of others) {
      if (o.start < blockEnd && o.end > blockBegin && !overlapping.includes(o)) {
        problems.push({ code: 'overlap', message: `${unit.label} would overlap trial ${o.a.runId} on ${move.rig} (${o.a.start} to ${o.a.end})` });
      }
    }
    const after = others.find((o) => o.start >= blockEnd);
    if (after) {
      const next = byId.get(after.a.runId)!;
      let needMs = 0;
      p.changeoverFactors.forEach((f, k) => {
        if (lastMoved.run.levels[k] !== next.levels[k]) needMs += f.ms;
      });
      const gap = after.start - blockEnd;
      if (gap < Math.max(needMs, p.cooldownMs)) {
        problems.push({
          code: 'changeover_gap',
          message: `trial ${after.a.runId} follows ${gap / 60_000} min after the moved work, but needs ${Math.max(needMs, p.cooldownMs) / 60_000} min for its changeover or cool-down`,
        });
      }
    }
    if (window && (blockBegin < window.start || blockEnd > window.end)) {
      problems.push({ code: 'block_day', message: `${unit.label} belongs to block ${window.block}, which stands for ${window.day}; it must stay on that day` });
    }
  }
  const assignments = [...result.assignments.filter((a) => !movedIds.has(a.runId)), ...moved].sort(
    (a, b) => Date.parse(a.start) - Date.parse(b.start) || a.rig.localeCompare(b.rig),
  );
  return { ok: problems.length === 0, problems, moved, assignments };
}
