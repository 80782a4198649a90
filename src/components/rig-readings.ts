/**
 * The plausibility checks of src/domain/metrics/plausibility.ts run on the tablet before an entry is
 * queued, so that a reading the server would refuse is refused at the bench even without network.
 * The response → standard reading mapping follows the server's (standardReadings in
 * src/server/repos/trials.ts, which cannot be imported into the browser); the server checks again.
 */
import { checkReadings, type ReadingIssue, type TrialReadings } from '@/domain/metrics/plausibility';

const LENGTH_TO_M: Record<string, number> = { m: 1, cm: 0.01, mm: 0.001 };
const ENERGY_TO_J: Record<string, number> = { J: 1, mJ: 0.001, uJ: 1e-6, 'µJ': 1e-6 };

export interface TabletReadingsCheck {
  errors: { field: string; message: string }[];
  warnings: { field: string; message: string }[];
}

/** Check a tablet entry; fields are named as the server names them (observations.<response>). */
export function checkTabletReadings(
  responses: { name: string; unit?: string }[],
  observations: Record<string, number>,
  entry: { passed: boolean; failureReason: string; startedAt: string; finishedAt: string },
  context: { now: string; robotMassKg?: number | null; robotHeightM?: number | null },
): TabletReadingsCheck {
  const readings: TrialReadings = {};
  const fieldOf: Partial<Record<keyof TrialReadings, string>> = {};
  for (const r of responses) {
    const v = observations[r.name];
    if (v === undefined) continue;
    const unit = r.unit ?? '';
    if (/apex|height/i.test(r.name) && LENGTH_TO_M[unit] !== undefined) {
      readings.apexHeightM = v * LENGTH_TO_M[unit]!;
      fieldOf.apexHeightM = r.name;
    } else if (/energy/i.test(r.name) && ENERGY_TO_J[unit] !== undefined) {
      readings.energyJ = v * ENERGY_TO_J[unit]!;
      fieldOf.energyJ = r.name;
    } else if (/distance|travel/i.test(r.name) && LENGTH_TO_M[unit] !== undefined) {
      readings.distanceM = v * LENGTH_TO_M[unit]!;
      fieldOf.distanceM = r.name;
    } else if (/hops/i.test(r.name)) {
      readings.hopsCompleted = v;
      fieldOf.hopsCompleted = r.name;
    }
  }
  const check = checkReadings(
    { ...readings, passed: entry.passed, failureReason: entry.failureReason || null, startedAt: entry.startedAt, finishedAt: entry.finishedAt },
    { now: context.now, robotMassKg: context.robotMassKg ?? null, robotHeightM: context.robotHeightM ?? null },
  );
  const named = (i: ReadingIssue) => ({ field: fieldOf[i.field] ? `observations.${fieldOf[i.field]}` : i.field, message: i.message });
  return { errors: check.errors.map(named), warnings: check.warnings.map(named) };
}
