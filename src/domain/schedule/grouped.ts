/**
 * Grouped solver: fewest changeovers first, then the earliest finish.
 *
 * Whole plots (and loose runs) that need the same levels of the hard-to-change factors form a group.
 * Groups are packed onto rigs by estimated rig time; a group that fits nowhere whole is split over the
 * rigs with the most time left (each split costs one changeover). Each rig then runs its groups in a
 * nearest-level order, continuing from the level it stands at. Inside a group the whole plots keep the
 * design's order, and inside a whole plot the runs are never reordered. Several packings (two packing
 * rules, shrinking capacity estimates) are simulated on the real calendars and the best is kept.
 */
import { changeoverLowerBound } from './bounds';
import { exactPlan, exactSearchSize } from './exact';
import type { Prepared, Unit } from './prepare';
import { emptyRigState, placementsOf, placeUnit, type RigState } from './rig-timeline';
import { sequentialFill, type RigPlan } from './sequential';

/** Below this many leaves of the search tree the plan is found by exact search. */
export const EXACT_SEARCH_LIMIT = 100_000;

interface Group {
  key: string;
  first: string[];
  last: string[];
  units: Unit[];
  loadMs: number;
  firstIndex: number;
}

/** Weighted level distance: changeover time from the levels `from` to the levels `to`. */
function distanceMs(p: Prepared, from: readonly (string | undefined)[], to: readonly string[]): number {
  let d = 0;
  p.changeoverFactors.forEach((f, k) => {
    if (from[k] !== undefined && from[k] !== to[k]) d += f.ms;
  });
  return d;
}

/** Estimated rig time of a unit: trials, cool-downs, forced changeovers inside it, its share of upkeep. */
function unitLoadMs(p: Prepared, unit: Unit): number {
  let load = 0;
  unit.runs.forEach((r, j) => {
    load += r.durationMs + p.cooldownMs;
    if (j > 0) load += distanceMs(p, unit.runs[j - 1]!.levels, r.levels);
  });
  const u = p.upkeep;
  if (u && u.ms > 0) {
    const perTrials = Number.isFinite(u.everyTrials) ? unit.runs.length / u.everyTrials : 0;
    const perTime = Number.isFinite(u.everyMs) ? unit.workMs / u.everyMs : 0;
    load += Math.max(perTrials, perTime) * u.ms;
  }
  return load;
}

function buildGroups(p: Prepared, units: readonly Unit[]): Group[] {
  const map = new Map<string, Group>();
  const groups: Group[] = [];
  for (const unit of units) {
    // Only factors whose change costs time tell groups apart.
    const first = unit.runs[0]!.levels;
    const last = unit.runs[unit.runs.length - 1]!.levels;
    const key = unitKey(p, unit);
    let g = map.get(key);
    if (!g) {
      g = { key, first, last, units: [], loadMs: 0, firstIndex: unit.firstIndex };
      map.set(key, g);
      groups.push(g);
    }
    g.units.push(unit);
    g.loadMs += unitLoadMs(p, unit);
  }
  return groups;
}

interface Piece {
  group: Group;
  units: Unit[];
}

type PackRule = 'balanced' | 'first-fit';

/**
 * Pack groups onto rigs. `capacity[r]` is the estimated rig time left; `setupMs` is reserved for each
 * group a rig takes beyond its first.
 */
function packGroups(p: Prepared, groups: readonly Group[], capacity: number[], rule: PackRule, setupMs: number): Piece[][] {
  const rigs = capacity.length;
  const load = new Array<number>(rigs).fill(0);
  const pieces: Piece[][] = Array.from({ length: rigs }, () => []);
  const room = (r: number) => capacity[r]! - load[r]! - (pieces[r]!.length > 0 ? setupMs : 0);
  const order = groups.slice().sort((a, b) => b.loadMs - a.loadMs || a.firstIndex - b.firstIndex);
  const leftovers: Group[] = [];
  for (const g of order) {
    let best = -1;
    for (let r = 0; r < rigs; r++) {
      if (room(r) < g.loadMs) continue;
      if (best < 0) best = r;
      else if (rule === 'balanced' && load[r]! < load[best]!) best = r;
      if (rule === 'first-fit') break;
    }
    if (best >= 0) {
      load[best]! += g.loadMs + (pieces[best]!.length > 0 ? setupMs : 0);
      pieces[best]!.push({ group: g, units: g.units.slice() });
    } else leftovers.push(g);
  }
  // Split what fits nowhere whole over the rigs with the most room, biggest room first.
  for (const g of leftovers) {
    const queue = g.units.slice();
    const tried = new Set<number>();
    while (queue.length > 0) {
      let best = -1;
      for (let r = 0; r < rigs; r++) if (!tried.has(r) && (best < 0 || room(r) > room(best))) best = r;
      if (best < 0) break;
      tried.add(best);
      const extra = pieces[best]!.length > 0 ? setupMs : 0;
      let space = room(best);
      const take: Unit[] = [];
      while (queue.length > 0) {
        const l = unitLoadMs(p, queue[0]!);
        if (l > space) break;
        take.push(queue.shift()!);
        space -= l;
      }
      if (take.length === 0) continue;
      take.sort((a, b) => a.firstIndex - b.firstIndex);
      load[best]! += extra + take.reduce((s, u) => s + unitLoadMs(p, u), 0);
      pieces[best]!.push({ group: g, units: take });
    }
    // Whatever is left still needs a rig: the least loaded one (the simulation will say if it fits).
    if (queue.length > 0) {
      let best = 0;
      for (let r = 1; r < rigs; r++) if (load[r]! < load[best]!) best = r;
      load[best]! += queue.reduce((s, u) => s + unitLoadMs(p, u), 0);
      pieces[best]!.push({ group: g, units: queue.sort((a, b) => a.firstIndex - b.firstIndex) });
    }
  }
  return pieces;
}

/** Order a rig's pieces nearest-level first, starting from the levels the rig stands at. */
function orderPieces(p: Prepared, pieces: Piece[], startLevels: readonly (string | undefined)[]): Piece[] {
  const left = pieces.slice().sort((a, b) => a.units[0]!.firstIndex - b.units[0]!.firstIndex);
  const out: Piece[] = [];
  let at = startLevels;
  while (left.length > 0) {
    let best = 0;
    let bestD = Infinity;
    left.forEach((piece, i) => {
      const d = distanceMs(p, at, piece.group.first);
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    });
    const piece = left.splice(best, 1)[0]!;
    out.push(piece);
    at = piece.group.last;
  }
  return out;
}

/** A plan with the per-rig unit order it came from, so it can be improved by moves. */
interface SequencedPlan {
  plan: RigPlan;
  sequence: Unit[][];
}

function simulate(p: Prepared, initial: readonly RigState[], sequence: Unit[][]): RigPlan {
  const states = initial.map((s) => s);
  const unplaced: Unit[] = [];
  sequence.forEach((units, r) => {
    for (const unit of units) {
      const next = placeUnit(states[r]!, unit, p);
      if (next) states[r] = next;
      else unplaced.push(unit);
    }
  });
  // Anything that did not fit where packed gets a second chance anywhere, in design order.
  if (unplaced.length === 0) return { states, unplaced, notes: [] };
  unplaced.sort((a, b) => a.firstIndex - b.firstIndex);
  return sequentialFill(p, unplaced, states);
}

function countChanges(plan: RigPlan): number {
  let n = 0;
  for (const s of plan.states) n += s.changes;
  return n;
}

function finish(plan: RigPlan): number {
  let t = -Infinity;
  for (const s of plan.states) t = Math.max(t, s.lastEnd);
  return t;
}

function unplacedRuns(plan: RigPlan): number {
  return plan.unplaced.reduce((s, u) => s + u.runs.length, 0);
}

function better(a: RigPlan, b: RigPlan): boolean {
  const ua = unplacedRuns(a);
  const ub = unplacedRuns(b);
  if (ua !== ub) return ua < ub;
  const ca = countChanges(a);
  const cb = countChanges(b);
  if (ca !== cb) return ca < cb;
  return finish(a) < finish(b);
}

/** Rig time still available after a state's cursor (within a window, when given). */
function remainingCapacity(state: RigState, window?: { start: number; end: number }): number {
  let total = 0;
  const from = Math.max(state.cursor, window?.start ?? -Infinity);
  const to = window?.end ?? Infinity;
  for (const iv of state.rig.intervals) {
    const s = Math.max(iv.start, from);
    const e = Math.min(iv.end, to);
    if (e > s) total += e - s;
  }
  return total;
}

/** Plan `units` onto the rigs after `initial` (empty rigs, or the work already fixed). */
function planUnits(p: Prepared, units: readonly Unit[], initial: readonly RigState[], window?: { start: number; end: number }): RigPlan {
  if (units.length === 0) return { states: initial.slice(), unplaced: [], notes: [] };
  if (exactSearchSize(units.length, initial.length) <= EXACT_SEARCH_LIMIT) return keepDesignOrder(p, initial, units, exactPlan(p, units, initial));
  const pinned = units.filter((u) => u.rigIndex !== undefined);
  const free = units.filter((u) => u.rigIndex === undefined);
  const groups = buildGroups(p, free);
  const setupMs = p.changeoverFactors.reduce((s, f) => s + f.ms, 0);
  const baseCapacity = initial.map((s) => remainingCapacity(s, window));
  const pinnedLoad = initial.map(() => 0);
  for (const u of pinned) pinnedLoad[u.rigIndex!]! += unitLoadMs(p, u);

  let best: SequencedPlan | undefined;
  const lowerBound = changeoverLowerBound(p, units);
  for (const factor of [1, 0.97, 0.94, 0.9, 0.85, 0.8, 0.7]) {
    for (const rule of ['balanced', 'first-fit'] as const) {
      const capacity = baseCapacity.map((c, r) => c * factor - pinnedLoad[r]!);
      const pieces = packGroups(p, groups, capacity, rule, setupMs);
      const sequence = pieces.map((list, r) => {
        const pinnedHere = pinned.filter((u) => u.rigIndex === r).sort((a, b) => a.firstIndex - b.firstIndex);
        const at = pinnedHere.length ? pinnedHere[pinnedHere.length - 1]!.runs.at(-1)!.levels : initial[r]!.lastLevels;
        return [...pinnedHere, ...orderPieces(p, list, at).flatMap((piece) => piece.units)];
      });
      const plan = simulate(p, initial, sequence);
      if (!best || better(plan, best.plan)) best = { plan, sequence };
    }
    if (best && best.plan.unplaced.length === 0 && countChanges(best.plan) <= lowerBound) break;
  }
  return keepDesignOrder(p, initial, units, improveByMoves(p, initial, best!).plan);
}

/** Group key of a unit: its first and last levels of the factors whose change costs time. */
function unitKey(p: Prepared, unit: Unit): string {
  const costly = (levels: readonly string[]) => levels.map((l, k) => (p.changeoverFactors[k]!.ms > 0 ? l : '')).join('\u0001');
  return `${costly(unit.runs[0]!.levels)}\u0002${costly(unit.runs[unit.runs.length - 1]!.levels)}`;
}

/**
 * Where whole plots with the same levels follow one another on a rig, put them back in the design's
 * order, as long as that costs no unplaced run, no changeover and no finishing time.
 */
function keepDesignOrder(p: Prepared, initial: readonly RigState[], units: readonly Unit[], plan: RigPlan): RigPlan {
  const unitOfRun = new Map<string, Unit>();
  for (const u of units) for (const r of u.runs) unitOfRun.set(r.id, u);
  let changed = false;
  const sequence = plan.states.map((state) => {
    const list: Unit[] = [];
    for (const x of placementsOf(state)) {
      const u = unitOfRun.get(x.run.id);
      if (u && list[list.length - 1] !== u) list.push(u);
    }
    const out: Unit[] = [];
    let i = 0;
    while (i < list.length) {
      let j = i + 1;
      const key = unitKey(p, list[i]!);
      while (j < list.length && unitKey(p, list[j]!) === key && list[j]!.rigIndex === list[i]!.rigIndex) j++;
      const stretch = list.slice(i, j).sort((a, b) => a.firstIndex - b.firstIndex);
      if (stretch.some((u, k) => u !== list[i + k])) changed = true;
      out.push(...stretch);
      i = j;
    }
    return out;
  });
  if (!changed || plan.unplaced.length > 0) return plan;
  const ordered = simulate(p, initial, sequence);
  return better(plan, ordered) ? plan : ordered;
}

/**
 * Local search: move one unit to another place (any rig, any position) or swap two units, keep the
 * change when the simulated plan is better (fewer unplaced runs, fewer changeovers, earlier finish);
 * repeat until no move helps or the evaluation budget (scaled to the problem size) is spent.
 * Units pinned to a rig stay on it; the runs inside a unit never move relative to each other.
 */
function improveByMoves(p: Prepared, initial: readonly RigState[], start: SequencedPlan): SequencedPlan {
  const runs = start.sequence.reduce((s, list) => s + list.reduce((a, u) => a + u.runs.length, 0), 0);
  let budget = Math.max(10, Math.min(3000, Math.floor(100_000 / Math.max(1, runs))));
  let current = start;
  const rigs = current.sequence.length;
  const tryCandidate = (sequence: Unit[][]): boolean => {
    budget--;
    const plan = simulate(p, initial, sequence);
    if (better(plan, current.plan)) {
      current = { plan, sequence };
      return true;
    }
    return false;
  };
  let improved = true;
  while (improved && budget > 0) {
    improved = false;
    outer: for (let a = 0; a < rigs; a++) {
      for (let i = 0; i < current.sequence[a]!.length; i++) {
        const unit = current.sequence[a]![i]!;
        for (let b = 0; b < rigs; b++) {
          if (unit.rigIndex !== undefined && unit.rigIndex !== b) continue;
          const targetLength = current.sequence[b]!.length - (a === b ? 1 : 0);
          for (let j = 0; j <= targetLength; j++) {
            if (a === b && j === i) continue;
            if (budget <= 0) break outer;
            const next = current.sequence.map((list) => list.slice());
            next[a]!.splice(i, 1);
            next[b]!.splice(j, 0, unit);
            if (tryCandidate(next)) {
              improved = true;
              break outer;
            }
          }
        }
        // Swap with a unit on another rig (moves alone cannot exchange two full rigs' work).
        for (let b = a + 1; b < rigs; b++) {
          for (let j = 0; j < current.sequence[b]!.length; j++) {
            const other = current.sequence[b]![j]!;
            if ((unit.rigIndex !== undefined && unit.rigIndex !== b) || (other.rigIndex !== undefined && other.rigIndex !== a)) continue;
            if (budget <= 0) break outer;
            const next = current.sequence.map((list) => list.slice());
            next[a]![i] = other;
            next[b]![j] = unit;
            if (tryCandidate(next)) {
              improved = true;
              break outer;
            }
          }
        }
      }
    }
  }
  return current;
}

/**
 * Grouped plan for all units. Units pinned to a day (blocks) are planned day by day in calendar
 * order; the rest follow on the time that remains.
 */
export function groupedPlan(p: Prepared, units: readonly Unit[] = p.units, initial?: RigState[]): RigPlan {
  let states = initial ?? p.rigs.map(emptyRigState);
  const unplaced: Unit[] = [];
  const byDay = new Map<number, Unit[]>();
  for (const u of units) if (u.window) byDay.set(u.window.start, [...(byDay.get(u.window.start) ?? []), u]);
  for (const start of [...byDay.keys()].sort((a, b) => a - b)) {
    const dayUnits = byDay.get(start)!;
    const plan = planUnits(p, dayUnits, states, dayUnits[0]!.window);
    states = plan.states;
    unplaced.push(...plan.unplaced);
  }
  const rest = units.filter((u) => !u.window);
  const plan = planUnits(p, rest, states);
  const candidate: RigPlan = { states: plan.states, unplaced: [...unplaced, ...plan.unplaced], notes: [] };
  // The sequential fill is a fallback candidate too: on some inputs it packs tighter.
  const sequential = sequentialFill(p, units.slice().sort((a, b) => (a.window?.start ?? Infinity) - (b.window?.start ?? Infinity) || a.firstIndex - b.firstIndex), (initial ?? p.rigs.map(emptyRigState)).slice());
  return better(sequential, candidate) ? sequential : candidate;
}
