/**
 * Lower bounds on changeovers and makespan for a set of runs, used to report the solver's gap.
 */
import type { MsInterval } from './calendar';
import { MINUTE, type Prepared, type PreparedRun, type Unit } from './prepare';

/**
 * Changeovers: for each factor with a positive changeover time, a rig's run of trials at one level
 * (a segment) holds at most that rig's capacity, so level ℓ with trial time W_ℓ needs at least
 * ⌈W_ℓ / C_max⌉ segments; changes = segments − rigs used. Changes forced inside whole plots are a
 * second bound; the larger is kept (counting argument, common practice, no source).
 */
export function changeoverLowerBound(p: Prepared, units: readonly Unit[]): number {
  return changeoverLowerBoundByFactor(p, units).reduce((a, b) => a + b, 0);
}

/** The bound above for each factor of `p.changeoverFactors` (0 for a factor with no changeover time). */
export function changeoverLowerBoundByFactor(p: Prepared, units: readonly Unit[]): number[] {
  const capacity = Math.max(0, ...p.rigs.map((r) => r.capacityMs));
  const rigsWithTime = p.rigs.filter((r) => r.capacityMs > 0).length;
  return p.changeoverFactors.map((f, k) => {
    if (f.ms <= 0) return 0;
    const work = new Map<string, number>();
    let internal = 0;
    for (const unit of units) {
      unit.runs.forEach((r, j) => {
        work.set(r.levels[k]!, (work.get(r.levels[k]!) ?? 0) + r.durationMs);
        if (j > 0 && unit.runs[j - 1]!.levels[k] !== r.levels[k]) internal++;
      });
    }
    let segments = 0;
    for (const w of work.values()) segments += capacity > 0 ? Math.ceil(w / capacity - 1e-9) : 1;
    return Math.max(internal, segments - Math.min(rigsWithTime, segments));
  });
}

/** Fewest upkeeps any schedule of `trials` trials on `rigs` rigs needs. */
export function minimumUpkeeps(p: Prepared, trials: number): number {
  if (!p.upkeep || p.upkeep.ms <= 0 || !Number.isFinite(p.upkeep.everyTrials)) return 0;
  return Math.max(0, Math.ceil(trials / p.upkeep.everyTrials) - p.rigs.length);
}

/** Rig time any schedule of `units` needs at least: trials, the fewest changeovers, the fewest upkeeps. */
export function minimumRigTimeMs(p: Prepared, units: readonly Unit[]): { trialMs: number; setupMs: number } {
  const trialMs = units.reduce((s, u) => s + u.workMs, 0);
  const changes = changeoverLowerBoundByFactor(p, units);
  let setupMs = changes.reduce((s, c, k) => s + c * p.changeoverFactors[k]!.ms, 0);
  setupMs += minimumUpkeeps(p, units.reduce((s, u) => s + u.runs.length, 0)) * (p.upkeep?.ms ?? 0);
  return { trialMs, setupMs };
}

/** Smallest T with ∑_rigs available time in [origin, origin + T] ≥ `workMs`; Infinity if never. */
export function earliestCompletion(intervalsByRig: readonly (readonly MsInterval[])[], originMs: number, workMs: number): number {
  if (workMs <= 0) return 0;
  const events: { t: number; d: number }[] = [];
  for (const intervals of intervalsByRig) for (const iv of intervals) events.push({ t: iv.start, d: 1 }, { t: iv.end, d: -1 });
  events.sort((a, b) => a.t - b.t || a.d - b.d);
  let active = 0;
  let done = 0;
  let t = originMs;
  for (const e of events) {
    if (active > 0 && e.t > t) {
      const gain = active * (e.t - t);
      if (done + gain >= workMs) return t + (workMs - done) / active - originMs;
      done += gain;
    }
    t = Math.max(t, e.t);
    active += e.d;
  }
  return Infinity;
}

/**
 * Makespan: all trial time, changeover time forced inside whole plots and the fewest upkeeps, spread
 * over every rig's available time from the origin on; and no later than the longest whole plot
 * starting at the origin on a single rig would allow (relaxation bound, common practice, no source).
 */
export function makespanLowerBound(p: Prepared, units: readonly Unit[]): number {
  const runs: PreparedRun[] = units.flatMap((u) => u.runs);
  if (runs.length === 0) return 0;
  let work = runs.reduce((s, r) => s + r.durationMs, 0);
  for (const unit of units) {
    for (let j = 1; j < unit.runs.length; j++) {
      p.changeoverFactors.forEach((f, k) => {
        if (unit.runs[j - 1]!.levels[k] !== unit.runs[j]!.levels[k]) work += f.ms;
      });
    }
  }
  work += minimumUpkeeps(p, runs.length) * (p.upkeep?.ms ?? 0);
  const pooled = earliestCompletion(p.rigs.map((r) => r.intervals), p.originMs, work);
  const longestUnit = Math.max(...units.map((u) => u.workMs));
  const single = Math.min(...p.rigs.map((r) => earliestCompletion([r.intervals], p.originMs, longestUnit)));
  const bound = Math.max(pooled, single);
  return Number.isFinite(bound) ? bound / MINUTE : 0;
}
