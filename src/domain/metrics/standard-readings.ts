/**
 * The standard rig readings: apex height (mm), hops completed, distance travelled (mm) and electrical
 * energy drawn (mJ), offered on every rig page whether or not the campaign declared them as responses,
 * plus pass/fail with a failure reason. This module is the one mapping between them and the trial's
 * observations, shared by the server and the tablet so that both check and store the same way:
 *
 * - a campaign response that stands for a standard reading (its exact standard name, or a name that
 *   reads like it with a unit of the right quantity) IS that reading: stored under the response's name
 *   and unit, entered once;
 * - otherwise the reading is stored under its fixed name and unit (apex_height mm, hops_completed
 *   count, distance_travelled mm, energy_drawn mJ);
 * - the other responses of the campaign follow as further fields.
 */
import type { TrialReadings } from './plausibility';
import { unitDefinition } from './units';

export type StandardKey = 'apexHeight' | 'hopsCompleted' | 'distanceTravelled' | 'energyDrawn';

/** Field of the plausibility check that a standard reading feeds. */
export type CheckedField = 'apexHeightM' | 'hopsCompleted' | 'distanceM' | 'energyJ';

export interface StandardReading {
  key: StandardKey;
  /** Observation name when no campaign response stands for the reading. */
  name: string;
  /** Unit of that observation. */
  unit: string;
  label: string;
  check: CheckedField;
  /** SI unit of the check ('' for a count). */
  siUnit: 'm' | 'J' | '';
  /** Response names that mean this reading (tested when the name is not the standard name itself). */
  pattern: RegExp;
}

/** Units a count may be declared in. */
const COUNT_UNITS = new Set(['', 'count', '1', 'hops', 'hop', 'n']);

/** The unit words a count (hops completed) may carry: none, or one of these. */
export const COUNT_UNIT_WORDS: readonly string[] = [...COUNT_UNITS].filter((u) => u !== '');

/** True when `unit` is a unit a count may be declared in (including none). */
export function isCountUnit(unit: string): boolean {
  return COUNT_UNITS.has(unit.trim());
}

export const STANDARD_READINGS: readonly StandardReading[] = [
  { key: 'apexHeight', name: 'apex_height', unit: 'mm', label: 'Apex height', check: 'apexHeightM', siUnit: 'm', pattern: /apex|hop.?height|jump.?height|^height$/i },
  { key: 'hopsCompleted', name: 'hops_completed', unit: 'count', label: 'Hops completed', check: 'hopsCompleted', siUnit: '', pattern: /^hops?(_?count|_?completed)?$|hops.?completed|number.?of.?hops/i },
  { key: 'distanceTravelled', name: 'distance_travelled', unit: 'mm', label: 'Distance travelled', check: 'distanceM', siUnit: 'm', pattern: /distance|travel/i },
  { key: 'energyDrawn', name: 'energy_drawn', unit: 'mJ', label: 'Electrical energy drawn', check: 'energyJ', siUnit: 'J', pattern: /^(?!.*per.?hop).*energy/i },
];

/** Names the operator chooses a failure reason from; "other" takes a description. */
export const FAILURE_KINDS = ['fell', 'broke', 'stalled', 'other'] as const;
export type FailureKind = (typeof FAILURE_KINDS)[number];

/** One field of the rig page's readings form and the observation it is stored as. */
export interface ReadingField {
  /** Observation name. */
  name: string;
  unit: string;
  /** What the form shows. */
  label: string;
  standard: StandardKey | null;
  /** True when a campaign response is stored under this name. */
  response: boolean;
  /** Multiplier from `unit` to the check's SI unit; null when the unit cannot be converted. */
  toSi: number | null;
}

export interface ReadingFields {
  /** The four standard readings, in the order of STANDARD_READINGS. */
  standard: ReadingField[];
  /** The campaign's other responses, in their order. */
  others: ReadingField[];
}

interface ResponseLike {
  name: string;
  unit?: string | null;
}

function toSi(reading: StandardReading, unit: string): number | null {
  if (reading.siUnit === '') return COUNT_UNITS.has(unit.trim()) ? 1 : null;
  const u = unitDefinition(unit);
  if (!u) return unit.trim() === reading.siUnit ? 1 : null;
  const quantity = reading.siUnit === 'm' ? 'length' : 'energy';
  return u.quantity === quantity ? u.scale : null;
}

/** The readings form of a campaign: see the module comment. */
export function readingFields(responses: readonly ResponseLike[]): ReadingFields {
  const taken = new Set<string>();
  const standard: ReadingField[] = [];
  for (const s of STANDARD_READINGS) {
    const exact = responses.find((r) => r.name === s.name);
    const alike = exact ?? responses.find((r) => !taken.has(r.name) && !STANDARD_READINGS.some((o) => o.name === r.name) && s.pattern.test(r.name) && toSi(s, r.unit ?? '') !== null);
    if (alike) {
      taken.add(alike.name);
      standard.push({ name: alike.name, unit: alike.unit ?? '', label: s.label, standard: s.key, response: true, toSi: toSi(s, alike.unit ?? '') });
    } else {
      standard.push({ name: s.name, unit: s.unit, label: s.label, standard: s.key, response: false, toSi: toSi(s, s.unit) });
    }
  }
  const others = responses.filter((r) => !taken.has(r.name)).map((r) => ({ name: r.name, unit: r.unit ?? '', label: r.name, standard: null, response: true, toSi: null }));
  return { standard, others };
}

/** Every observation name a trial of this campaign may carry, with its unit. */
export function observationFields(responses: readonly ResponseLike[]): ReadingField[] {
  const f = readingFields(responses);
  return [...f.standard, ...f.others];
}

/** The field an observation name belongs to, or undefined when the campaign has no such reading. */
export function observationField(responses: readonly ResponseLike[], name: string): ReadingField | undefined {
  return observationFields(responses).find((f) => f.name === name);
}

/** How a field is named and in which unit it is entered, for the plausibility messages. */
export type FieldLabels = Partial<Record<keyof TrialReadings, { name: string; unit: string; toSi: number }>>;

/**
 * The standard readings of a trial in SI units for the plausibility checks, which observation each
 * came from (`fieldOf`), and how to name each in a message (`labels`).
 */
export function standardReadings(
  responses: readonly ResponseLike[],
  observations: Record<string, number>,
): { readings: TrialReadings; fieldOf: Partial<Record<keyof TrialReadings, string>>; labels: FieldLabels } {
  const readings: TrialReadings = {};
  const fieldOf: Partial<Record<keyof TrialReadings, string>> = {};
  const labels: FieldLabels = {};
  const { standard } = readingFields(responses);
  STANDARD_READINGS.forEach((s, i) => {
    const field = standard[i]!;
    const v = observations[field.name];
    if (v === undefined || field.toSi === null) return;
    readings[s.check] = v * field.toSi;
    fieldOf[s.check] = field.name;
    labels[s.check] = { name: field.name, unit: field.unit || s.siUnit, toSi: field.toSi };
  });
  return { readings, fieldOf, labels };
}

/** The stored failure reason for a kind and the operator's words (required for "other"). */
export function failureReasonText(kind: FailureKind | '', text: string): string {
  const words = text.trim();
  if (kind === '' || kind === 'other') return words;
  return words ? `${kind}: ${words}` : kind;
}

/** A stored failure reason split back into its kind and words (free text counts as "other"). */
export function parseFailureReason(stored: string): { kind: FailureKind | ''; text: string } {
  const s = stored.trim();
  if (s === '') return { kind: '', text: '' };
  const m = /^(fell|broke|stalled)(?::\s*(.*))?$/s.exec(s);
  return m ? { kind: m[1] as FailureKind, text: m[2] ?? '' } : { kind: 'other', text: s };
}
