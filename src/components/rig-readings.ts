/**
 * The plausibility checks of src/domain/metrics/plausibility.ts run on the tablet before an entry is
 * queued, so that a reading the server would refuse is refused at the bench even without network.
 * The response → standard reading mapping is the server's own (src/domain/metrics/standard-readings.ts);
 * the server checks again.
 */
import { checkReadings, type ReadingIssue } from '@/domain/metrics/plausibility';
import { standardReadings } from '@/domain/metrics/standard-readings';

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
  const { readings, fieldOf } = standardReadings(responses, observations);
  const check = checkReadings(
    { ...readings, passed: entry.passed, failureReason: entry.failureReason || null, startedAt: entry.startedAt, finishedAt: entry.finishedAt },
    { now: context.now, robotMassKg: context.robotMassKg ?? null, robotHeightM: context.robotHeightM ?? null },
  );
  const named = (i: ReadingIssue) => ({ field: fieldOf[i.field] ? `observations.${fieldOf[i.field]}` : i.field, message: i.message });
  return { errors: check.errors.map(named), warnings: check.warnings.map(named) };
}
