/**
 * Feasibility invariants of a schedule, checked from the request and the answer alone (no solver
 * internals), so every strategy is held to the same rules.
 */
import fc from 'fast-check';
import type { ScheduleRequest, ScheduleResult } from '@/domain/schedule';

const MIN = 60_000;

export function scheduleViolations(req: ScheduleRequest, res: ScheduleResult, options: { allowPartialWholePlots?: boolean } = {}): string[] {
  const bad: string[] = [];
  const runById = new Map(req.runs.map((r, i) => [r.id, { run: r, index: i }]));
  const duration = (id: string) => (runById.get(id)!.run.durationMinutes ?? req.defaultDurationMinutes!) * MIN;

  // Every run exactly once: scheduled or reported unscheduled.
  const seen = new Map<string, number>();
  for (const a of res.assignments) seen.set(a.runId, (seen.get(a.runId) ?? 0) + 1);
  for (const u of res.unscheduled) seen.set(u.runId, (seen.get(u.runId) ?? 0) + 1);
  for (const r of req.runs) if (seen.get(r.id) !== 1) bad.push(`run ${r.id} appears ${seen.get(r.id) ?? 0} times`);

  // Availability as given, with overlapping or touching intervals joined.
  const merged = (list: { start: string; end: string }[]) => {
    const ivs = list.map((a) => ({ start: Date.parse(a.start), end: Date.parse(a.end) })).sort((x, y) => x.start - y.start);
    const out: { start: number; end: number }[] = [];
    for (const iv of ivs) {
      const last = out[out.length - 1];
      if (last && iv.start <= last.end) last.end = Math.max(last.end, iv.end);
      else out.push({ ...iv });
    }
    return out;
  };
  const rigs = new Map(req.rigs.map((r) => [r.name, merged(r.available)]));
  const inside = (rig: string, s: number, e: number) => rigs.get(rig)!.some((iv) => s >= iv.start && e <= iv.end);

  for (const a of res.assignments) {
    const s = Date.parse(a.start);
    const e = Date.parse(a.end);
    if (Math.abs(e - s - duration(a.runId)) > 1) bad.push(`run ${a.runId} lasts ${(e - s) / MIN} min`);
    if (!inside(a.rig, s, e)) bad.push(`run ${a.runId} lies outside ${a.rig}'s availability`);
  }
  for (const act of res.activities) {
    if (!inside(act.rig, Date.parse(act.start), Date.parse(act.end))) bad.push(`${act.kind} before ${act.beforeRunId} lies outside availability`);
  }

  // No overlap per rig among trials and activities.
  for (const rig of rigs.keys()) {
    const items = [
      ...res.assignments.filter((a) => a.rig === rig).map((a) => ({ s: Date.parse(a.start), e: Date.parse(a.end), what: `run ${a.runId}` })),
      ...res.activities.filter((a) => a.rig === rig).map((a) => ({ s: Date.parse(a.start), e: Date.parse(a.end), what: `${a.kind} before ${a.beforeRunId}` })),
    ].sort((x, y) => x.s - y.s || x.e - y.e);
    for (let i = 1; i < items.length; i++) {
      if (items[i]!.s < items[i - 1]!.e) bad.push(`${items[i - 1]!.what} overlaps ${items[i]!.what} on ${rig}`);
    }
  }

  // Changeover gaps and cool-down between consecutive trials on a rig.
  const byRig = new Map<string, typeof res.assignments>();
  for (const a of res.assignments) byRig.set(a.rig, [...(byRig.get(a.rig) ?? []), a]);
  for (const [rig, list] of byRig) {
    list.sort((x, y) => Date.parse(x.start) - Date.parse(y.start));
    for (let i = 1; i < list.length; i++) {
      const prev = runById.get(list[i - 1]!.runId)!.run;
      const cur = runById.get(list[i]!.runId)!.run;
      let need = 0;
      for (const [f, m] of Object.entries(req.changeoverMinutes ?? {})) if (prev.values[f] !== cur.values[f]) need += m * MIN;
      const gap = Date.parse(list[i]!.start) - Date.parse(list[i - 1]!.end);
      if (gap < need) bad.push(`${rig}: ${cur.id} follows ${prev.id} after ${gap / MIN} min, changeover needs ${need / MIN}`);
      const cool = (req.upkeep?.cooldownMinutes ?? 0) * MIN;
      if (gap < cool) bad.push(`${rig}: ${cur.id} starts ${gap / MIN} min after ${prev.id}, cool-down is ${cool / MIN}`);
      const co = res.activities.filter((x) => x.kind === 'changeover' && x.beforeRunId === cur.id);
      const coMs = co.reduce((s, x) => s + Date.parse(x.end) - Date.parse(x.start), 0);
      if (coMs !== need) bad.push(`${rig}: changeover before ${cur.id} shown as ${coMs / MIN} min, needs ${need / MIN}`);
    }
    // Whole plots: contiguous on one rig, in design order.
    const plots = new Map<string, number[]>();
    list.forEach((a, pos) => {
      const wp = runById.get(a.runId)!.run.wholePlot;
      if (wp !== undefined) plots.set(String(wp), [...(plots.get(String(wp)) ?? []), pos]);
    });
    for (const [wp, positions] of plots) {
      for (let i = 1; i < positions.length; i++) if (positions[i] !== positions[i - 1]! + 1) bad.push(`whole plot ${wp} is not contiguous on ${rig}`);
      const order = positions.map((pos) => runById.get(list[pos]!.runId)!.index);
      for (let i = 1; i < order.length; i++) if (order[i]! < order[i - 1]!) bad.push(`whole plot ${wp} runs out of design order on ${rig}`);
    }
  }
  const rigOfPlot = new Map<string, Set<string>>();
  for (const a of res.assignments) {
    const wp = runById.get(a.runId)!.run.wholePlot;
    if (wp === undefined) continue;
    rigOfPlot.set(String(wp), (rigOfPlot.get(String(wp)) ?? new Set()).add(a.rig));
  }
  for (const [wp, set] of rigOfPlot) if (set.size > 1) bad.push(`whole plot ${wp} is split over rigs ${[...set].join(', ')}`);
  // A whole plot is scheduled whole or not at all.
  const scheduled = new Set(res.assignments.map((a) => a.runId));
  const plotState = new Map<string, Set<boolean>>();
  for (const r of req.runs) if (r.wholePlot !== undefined) plotState.set(String(r.wholePlot), (plotState.get(String(r.wholePlot)) ?? new Set()).add(scheduled.has(r.id)));
  if (!options.allowPartialWholePlots) for (const [wp, s] of plotState) if (s.size > 1) bad.push(`whole plot ${wp} is only partly scheduled`);
  return bad;
}

/** Random but valid requests: a few rigs with broken-up days, runs in whole plots or alone. */
export const requestArbitrary = fc
  .record({
    rigDays: fc.array(fc.array(fc.record({ day: fc.integer({ min: 2, max: 6 }), from: fc.integer({ min: 6, max: 12 }), hours: fc.integer({ min: 1, max: 8 }) }), { minLength: 0, maxLength: 4 }), { minLength: 1, maxLength: 3 }),
    runs: fc.array(
      fc.record({
        surface: fc.constantFrom('grass', 'ice', 'glass'),
        gain: fc.constantFrom(1, 2),
        minutes: fc.integer({ min: 5, max: 90 }),
        plot: fc.option(fc.integer({ min: 0, max: 5 }), { nil: undefined }),
      }),
      { minLength: 0, maxLength: 25 },
    ),
    surfaceMinutes: fc.integer({ min: 0, max: 60 }),
    gainMinutes: fc.integer({ min: 0, max: 5 }),
    upkeep: fc.option(fc.record({ everyTrials: fc.integer({ min: 1, max: 5 }), minutes: fc.integer({ min: 0, max: 20 }), cooldownMinutes: fc.integer({ min: 0, max: 10 }) }), { nil: undefined }),
  })
  .map(({ rigDays, runs, surfaceMinutes, gainMinutes, upkeep }): ScheduleRequest => ({
    runs: runs.map((r, i) => ({
      id: `r${i}`,
      values: { surface: r.plot === undefined ? r.surface : ['grass', 'ice', 'glass'][r.plot % 3]!, gain: r.gain },
      durationMinutes: r.minutes,
      ...(r.plot === undefined ? {} : { wholePlot: `wp${r.plot}` }),
    })),
    rigs: rigDays.map((days, k) => ({
      name: `rig${k}`,
      available: days.map((d) => ({
        start: new Date(Date.UTC(2026, 2, d.day, d.from)).toISOString(),
        end: new Date(Date.UTC(2026, 2, d.day, d.from + d.hours)).toISOString(),
      })),
    })),
    changeoverMinutes: { surface: surfaceMinutes, gain: gainMinutes },
    ...(upkeep ? { upkeep } : {}),
  }));

