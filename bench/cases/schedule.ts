/**
 * Scheduler benchmark (issue target: 500 runs, 5 rigs, 5 days, 40-minute surface swaps in ≤ 1 s, with
 * changeovers within 5% of the lower bound). Invented scenario: a split-plot campaign of 125 whole
 * plots of 4 runs; the surface is the whole-plot factor (5 surfaces, drawn with a seed, so the
 * surfaces carry unequal work), payload and controller gain change inside each whole plot; a second
 * case draws from 8 surfaces, more than there are rigs, so the bound is above zero. Five rigs
 * work Monday to Friday 08:00-17:00 in Europe/Berlin; battery swap every 10 trials (10 min),
 * 2-minute cool-down.
 */
import { randomInt, seededRandom } from '../../src/domain/random';
import { planSchedule, workingAvailability, type ScheduleRequest, type ScheduleResult } from '../../src/domain/schedule';
import type { BenchCase } from '../types';

const SURFACES = ['grass', 'ice', 'wet glass', 'loose soil', 'tilting plate'];
const MORE_SURFACES = [...SURFACES, 'sand', 'carpet', 'foam'];

export function benchmarkRequest(surfaces = SURFACES, runsPerPlot = 4, plots = 125, rigs = 5, minutes = 20): ScheduleRequest {
  const rng = seededRandom(20260302);
  const runs: ScheduleRequest['runs'] = [];
  for (let w = 0; w < plots; w++) {
    const surface = surfaces[randomInt(rng, surfaces.length)]!;
    for (let j = 0; j < runsPerPlot; j++) {
      runs.push({
        id: `wp${w}-r${j}`,
        values: { surface, payload: [0, 0.5, 1, 2][randomInt(rng, 4)]!, gain: [10, 20, 30][randomInt(rng, 3)]! },
        durationMinutes: minutes,
        wholePlot: w,
      });
    }
  }
  const available = workingAvailability({ workdays: [1, 2, 3, 4, 5], startTime: '08:00', endTime: '17:00', timeZone: 'Europe/Berlin' }, '2026-03-02', 5);
  return {
    runs,
    rigs: Array.from({ length: rigs }, (_, k) => ({ name: `rig ${k + 1}`, available })),
    changeoverMinutes: { surface: 40, gain: 0 },
    upkeep: { everyTrials: 10, minutes: 10, cooldownMinutes: 2 },
    timeZone: 'Europe/Berlin',
  };
}

function figures(r: ScheduleResult): Record<string, number | string> {
  return {
    changeovers: r.changeovers,
    changeoverBound: r.lowerBound.changeovers,
    withinFivePercent: r.changeovers <= Math.floor(r.lowerBound.changeovers * 1.05) ? 'yes' : 'no',
    makespanMin: r.makespanMinutes,
    makespanBoundMin: r.lowerBound.makespanMinutes,
    unscheduled: r.unscheduled.length,
  };
}

export const cases: BenchCase[] = [
  {
    name: 'schedule: 500 runs, 5 rigs, 5 days, 40-min surface swaps',
    target: '≤ 1 s, changeovers within 5% of the lower bound',
    targetSeconds: 1,
    setup: () => benchmarkRequest(),
    run: (req) => planSchedule(req as ScheduleRequest),
    warmup: 1,
    repeats: 5,
    report: (_req, result) => figures(result as ScheduleResult),
  },
  {
    name: 'schedule: as above with 8 surfaces (more surfaces than rigs)',
    target: '≤ 1 s, changeovers within 5% of the lower bound',
    targetSeconds: 1,
    setup: () => benchmarkRequest(MORE_SURFACES),
    run: (req) => planSchedule(req as ScheduleRequest),
    warmup: 1,
    repeats: 5,
    report: (_req, result) => figures(result as ScheduleResult),
  },
  {
    name: 'schedule: same campaign, sequential fill (design order)',
    setup: () => ({ ...benchmarkRequest(), strategy: 'sequential' as const }),
    run: (req) => planSchedule(req as ScheduleRequest),
    warmup: 1,
    repeats: 5,
    report: (_req, result) => figures(result as ScheduleResult),
  },
];
