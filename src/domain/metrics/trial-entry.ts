/**
 * The check of one logged trial, run by the tablet before it queues an entry and by the server before
 * it stores one, so both refuse the same entries with the same words: every observation must be a
 * reading of the campaign (a standard reading or a response), and the standard readings must pass the
 * plausibility checks. Issues name the field as the API does (`observations.<name>`, `failureReason`,
 * `startedAt`, `finishedAt`).
 */
import { checkReadings, type ReadingIssue } from './plausibility';
import { observationFields, standardReadings } from './standard-readings';

export interface TrialEntry {
  passed?: boolean | null;
  failureReason?: string | null;
  startedAt?: string | null;
  finishedAt?: string | null;
}

export interface EntryContext {
  now: string;
  robotMassKg?: number | null;
  robotHeightM?: number | null;
  /**
   * How to name an observation in the messages when it was entered under another name or unit than
   * it is stored in (a spreadsheet column, say): keyed by observation name; `toSi` takes a value in
   * `unit` to the SI unit of the check. Without it, messages use the observation's own name and unit.
   */
  labels?: Record<string, { name: string; unit: string; toSi: number }>;
}

export interface EntryIssue {
  field: string;
  message: string;
}

export interface EntryCheck {
  errors: EntryIssue[];
  warnings: EntryIssue[];
}

export function checkTrialEntry(
  responses: readonly { name: string; unit?: string | null }[],
  observations: Record<string, number>,
  entry: TrialEntry,
  context: EntryContext,
): EntryCheck {
  const fields = observationFields(responses);
  const errors: EntryIssue[] = [];
  for (const name of Object.keys(observations)) {
    if (!fields.some((f) => f.name === name)) {
      errors.push({ field: `observations.${name}`, message: `"${name}" is not a reading of this campaign; known: ${fields.map((f) => f.name).join(', ')}` });
    }
  }
  const { readings, fieldOf, labels: own } = standardReadings(responses, observations);
  const labels = { ...own };
  for (const key of Object.keys(labels) as (keyof typeof labels)[]) {
    const entered = context.labels?.[fieldOf[key] ?? ''];
    if (entered) labels[key] = entered;
  }
  const check = checkReadings(
    { ...readings, passed: entry.passed ?? null, failureReason: entry.failureReason || null, startedAt: entry.startedAt ?? null, finishedAt: entry.finishedAt ?? null },
    { now: context.now, robotMassKg: context.robotMassKg ?? null, robotHeightM: context.robotHeightM ?? null, labels },
  );
  const named = (i: ReadingIssue): EntryIssue => ({ field: fieldOf[i.field] ? `observations.${fieldOf[i.field]}` : i.field, message: i.message });
  return { errors: [...errors, ...check.errors.map(named)], warnings: check.warnings.map(named) };
}
