/**
 * The tablet runs the server's own check of a trial entry (src/domain/metrics/trial-entry.ts) before
 * an entry is queued, so that a reading the server would refuse is refused at the bench even without
 * network. The server checks again.
 */
import { checkTrialEntry, type EntryCheck } from '@/domain/metrics/trial-entry';

export type TabletReadingsCheck = EntryCheck;

/** Check a tablet entry; fields are named as the server names them (observations.<name>). */
export function checkTabletReadings(
  responses: { name: string; unit?: string }[],
  observations: Record<string, number>,
  entry: { passed: boolean; failureReason: string; startedAt: string; finishedAt: string },
  context: { now: string; robotMassKg?: number | null; robotHeightM?: number | null },
): TabletReadingsCheck {
  return checkTrialEntry(responses, observations, entry, context);
}
