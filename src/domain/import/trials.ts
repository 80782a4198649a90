/**
 * Import of past trials from a spreadsheet exported as CSV: a column mapping, unit conversion and a
 * row-by-row validation report. Nothing is decided about storage here; `trialsToStore` applies the
 * rule "the whole file is valid, or the user explicitly accepts only the valid rows".
 *
 * Besides factors, responses and trial fields, a column may hold one of the standard rig readings
 * (src/domain/metrics/standard-readings.ts), named by its standard name: `apex_height`,
 * `hops_completed`, `distance_travelled`, `energy_drawn` (or `reading:apex_height` when a name is
 * ambiguous). A reading is kept exactly as the rig page keeps it: under the campaign response that
 * stands for it when there is one (then `reading:apex_height` and `response:<that response>` are the
 * same field), otherwise under its standard name and unit; the values are converted to that unit and
 * go through the rig's plausibility check (src/domain/metrics/trial-entry.ts).
 */
import Papa from 'papaparse';
import { DomainError, invalidInput } from '@/domain/errors';
import type { Factor, FactorValue, Point, ResponseDefinition } from '@/domain/factors';
import { STANDARD_READINGS, COUNT_UNIT_WORDS, FAILURE_KINDS, failureReasonText, isCountUnit, readingFields, type FailureKind, type ReadingField, type StandardReading } from '@/domain/metrics/standard-readings';
import { checkTrialEntry } from '@/domain/metrics/trial-entry';
import { conversionFactor, knownUnits, unitDefinition } from '@/domain/metrics/units';

/** Trial fields that are neither factors nor responses. */
export const TRIAL_FIELDS = ['notes', 'startedAt', 'finishedAt', 'passed', 'failureReason', 'operator', 'robot', 'rig', 'runLabel'] as const;
export type TrialField = (typeof TRIAL_FIELDS)[number];

/**
 * Column name → what it holds: a factor name, a response name, a standard reading's name
 * (`apex_height`, `hops_completed`, `distance_travelled`, `energy_drawn`) or a trial field; prefix with
 * `factor:`, `response:`, `reading:` or `field:` when a name is ambiguous. An empty string ignores the column.
 */
export type ImportMapping = Record<string, string>;
/** Column name → the unit its numbers are in (converted to the factor's, response's or reading's unit). */
export type ImportUnits = Record<string, string>;

/** A robot of the campaign, for the plausibility checks that need its mass and height. */
export interface ImportRobot {
  name: string;
  massGrams: number;
  heightMm?: number | null;
}

export interface ImportOptions {
  /** Current time, ISO 8601: times after it are refused. */
  now?: string;
  /** The campaign's robots: a row naming one is checked against its mass and height, as at the rig. */
  robots?: readonly ImportRobot[];
}

export interface ImportIssue {
  /** CSV column, when the issue concerns one. */
  column?: string;
  /** Factor, response, reading (its observation name) or trial field concerned. */
  field: string;
  message: string;
}

export interface ImportedTrial {
  factors: Point;
  /** Campaign responses in their units, including one that stands for a standard reading; null when blank. */
  responses: Record<string, number | null>;
  /**
   * Standard readings that no campaign response stands for, under their standard names and in their
   * units (apex_height mm, hops_completed count, distance_travelled mm, energy_drawn mJ); null when blank.
   */
  readings: Record<string, number | null>;
  notes?: string;
  startedAt?: string;
  finishedAt?: string;
  passed?: boolean;
  /** As the rig page stores it: "fell", "broke: words", or the words alone for "other". */
  failureReason?: string;
  operator?: string;
  robot?: string;
  rig?: string;
  runLabel?: string;
}

export interface ImportRow {
  /** 1-based line of the file where the row starts (the header is line 1). */
  line: number;
  values: ImportedTrial;
  errors: ImportIssue[];
  warnings: ImportIssue[];
}

export interface ImportReport {
  /** Problems with the file or the mapping as a whole (no row can be valid while there are any). */
  fileErrors: ImportIssue[];
  rows: ImportRow[];
  /** True when there are no file errors and every row is valid. */
  valid: boolean;
  validCount: number;
  invalidCount: number;
}

type Target =
  | { kind: 'factor'; factor: Factor; scale: number }
  | { kind: 'response'; response: ResponseDefinition; scale: number }
  /** A standard reading; `field` is where it is stored (a campaign response standing for it, or its standard name). */
  | { kind: 'reading'; reading: StandardReading; field: ReadingField; scale: number }
  | { kind: 'field'; field: TrialField };

/** Mapping targets a campaign offers for the standard readings: the reading's name, where it is stored. */
export interface ReadingTarget {
  /** The standard name a column may be mapped to (`apex_height`, …). */
  reading: string;
  label: string;
  /** Observation the values are stored under, and its unit. */
  name: string;
  unit: string;
  /** True when a campaign response stands for the reading (mapping to that response is the same). */
  response: boolean;
}

/** The standard readings as mapping targets of a campaign with these responses. */
export function readingTargets(responses: readonly { name: string; unit?: string | null }[]): ReadingTarget[] {
  const { standard } = readingFields(responses);
  return STANDARD_READINGS.map((s, i) => ({ reading: s.name, label: s.label, name: standard[i]!.name, unit: standard[i]!.unit, response: standard[i]!.response }));
}

/** How a unit column for a standard reading converts: the scale to the field's unit, or a DomainError naming the column. */
function readingScale(column: string, unit: string | undefined, reading: StandardReading, field: ReadingField): number {
  if (!unit) return 1;
  const stored = field.unit || (reading.siUnit === '' ? 'count' : reading.siUnit);
  if (reading.siUnit === '') {
    if (isCountUnit(unit)) return 1;
    throw invalidInput(column, `column '${column}' holds ${field.name}, a count, and takes no unit; leave its unit empty (or write ${COUNT_UNIT_WORDS.join(', ')}) instead of '${unit}'`);
  }
  const quantity = reading.siUnit === 'm' ? 'length' : 'energy';
  const accepted = knownUnits().filter((u) => unitDefinition(u)?.quantity === quantity);
  const given = unitDefinition(unit);
  if (!given || given.quantity !== quantity) {
    const an = (w: string) => (/^[aeiou]/.test(w) ? `an ${w}` : `a ${w}`);
    const what = given ? `'${unit}' is ${an(given.quantity)} unit, not ${an(quantity)}` : `'${unit}' is not a known unit`;
    throw invalidInput(column, `column '${column}' holds ${field.name} (${reading.label.toLowerCase()}, stored in ${stored}): ${what}; use one of ${accepted.join(', ')}, or leave the unit empty when the numbers are in ${stored}`);
  }
  return conversionFactor(unit, stored, column);
}

function resolveTarget(
  column: string, spec: string, factors: readonly Factor[], responses: readonly ResponseDefinition[], units: ImportUnits,
): Target {
  const [prefix, rest] = spec.includes(':') ? [spec.slice(0, spec.indexOf(':')), spec.slice(spec.indexOf(':') + 1)] : ['', spec];
  const name = rest.trim();
  const { standard } = readingFields(responses);
  const factor = prefix === '' || prefix === 'factor' ? factors.find((f) => f.name === name) : undefined;
  const response = prefix === '' || prefix === 'response' ? responses.find((r) => r.name === name) : undefined;
  const readingIndex = prefix === '' || prefix === 'reading' ? STANDARD_READINGS.findIndex((s) => s.name === name) : -1;
  const field = prefix === '' || prefix === 'field' ? (TRIAL_FIELDS as readonly string[]).includes(name) : false;
  // A response that stands for a standard reading IS that reading: both names lead to the same field.
  const responseReading = response ? standard.findIndex((f) => f.response && f.name === response.name) : -1;
  const index = readingIndex >= 0 ? readingIndex : responseReading;
  const sameField = response !== undefined && readingIndex >= 0 && standard[readingIndex]!.name === response.name;
  const matches = [factor, response, readingIndex >= 0 || undefined, field || undefined].filter(Boolean).length - (sameField ? 1 : 0);
  if (matches === 0) {
    const known = [...factors.map((f) => f.name), ...responses.map((r) => r.name), ...standard.filter((f) => !f.response).map((f) => f.name), ...TRIAL_FIELDS].join(', ');
    throw invalidInput(column, `column '${column}' is mapped to '${spec}', which is not a factor, response, standard reading or trial field; use one of ${known}`);
  }
  if (matches > 1) throw invalidInput(column, `column '${column}': '${name}' names more than one thing; write factor:${name}, response:${name}, reading:${name} or field:${name}`);
  const unit = units[column]?.trim();
  if (factor) {
    if (factor.kind === 'categorical') {
      if (unit) throw invalidInput(column, `column '${column}' holds the categorical factor '${factor.name}' and takes no unit`);
      return { kind: 'factor', factor, scale: 1 };
    }
    return { kind: 'factor', factor, scale: unit && factor.unit ? conversionFactor(unit, factor.unit, column) : 1 };
  }
  if (index >= 0) {
    const reading = STANDARD_READINGS[index]!;
    const target = standard[index]!;
    return { kind: 'reading', reading, field: target, scale: readingScale(column, unit, reading, target) };
  }
  if (response) return { kind: 'response', response, scale: unit && response.unit ? conversionFactor(unit, response.unit, column) : 1 };
  return { kind: 'field', field: name as TrialField };
}

/** Target key: two columns with the same key hold the same thing. */
function targetKey(target: Target): string {
  switch (target.kind) {
    case 'factor':
      return `factor:${target.factor.name}`;
    case 'response':
      return `response:${target.response.name}`;
    case 'reading':
      return target.field.response ? `response:${target.field.name}` : `reading:${target.field.name}`;
    default:
      return `field:${target.field}`;
  }
}

/** A failure reason cell: one of the kinds, optionally with words ("fell: tipped"), or "other: words". */
function parseFailureReasonCell(cell: string): { reason: string } | { error: string } {
  const m = /^([a-z]+)\s*(?::\s*([\s\S]*))?$/i.exec(cell.trim());
  const kind = m?.[1]?.toLowerCase();
  if (!m || !(FAILURE_KINDS as readonly string[]).includes(kind ?? '')) {
    return { error: `'${cell}' is not a failure reason; write ${FAILURE_KINDS.filter((k) => k !== 'other').join(', ')} (optionally followed by ': words', e.g. 'fell: tipped on landing') or 'other: words'` };
  }
  const words = (m[2] ?? '').trim();
  if (kind === 'other' && words === '') return { error: `'${cell}' gives no words; write 'other: ' followed by what happened` };
  return { reason: failureReasonText(kind as FailureKind, words) };
}

function parseNumberCell(text: string, decimalComma: boolean): number {
  let s = text.trim().replace(/[\s\u00a0']/g, '');
  // With a semicolon or tab delimiter a comma is the decimal mark and dots group thousands.
  if (decimalComma && s.includes(',')) s = s.replace(/\./g, '').replace(',', '.');
  if (s === '' || !/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(s)) return Number.NaN;
  return Number(s);
}

const TRUE_WORDS = new Set(['true', 'yes', 'y', '1', 'pass', 'passed', 'ok']);
const FALSE_WORDS = new Set(['false', 'no', 'n', '0', 'fail', 'failed']);

/** ISO 8601 date-time, or "YYYY-MM-DD HH:MM[:SS]" (read as UTC, with a warning). */
function parseTimeCell(text: string): { iso: string; zoned: boolean } | undefined {
  const s = text.trim();
  const m = /^(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?)(Z|[+-]\d{2}:?\d{2})?$/.exec(s);
  if (!m) return undefined;
  const zoned = m[3] !== undefined;
  const ms = Date.parse(`${m[1]}T${m[2]}${m[3] ?? 'Z'}`);
  if (!Number.isFinite(ms)) return undefined;
  return { iso: new Date(ms).toISOString(), zoned };
}

const RELATIVE_TOLERANCE = 1e-9;

/** Validate every row of a past-trials CSV against the campaign's factors and responses. */
export function validateTrialImport(
  csv: string,
  mapping: ImportMapping,
  units: ImportUnits,
  factors: readonly Factor[],
  responses: readonly ResponseDefinition[],
  options: ImportOptions = {},
): ImportReport {
  const fileErrors: ImportIssue[] = [];
  const parsed = Papa.parse<string[]>(csv.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: false });
  const records = parsed.data;
  // Lines where each record starts: count newlines inside quoted cells too.
  const header = (records[0] ?? []).map((h) => h.trim());
  if (header.length === 0 || header.every((h) => h === '')) {
    return { fileErrors: [{ field: '(file)', message: 'the file is empty; export the sheet with a header row' }], rows: [], valid: false, validCount: 0, invalidCount: 0 };
  }
  const decimalComma = parsed.meta.delimiter === ';' || parsed.meta.delimiter === '\t';

  // Resolve the mapping.
  const columns: { index: number; column: string; target: Target }[] = [];
  const seen = new Map<string, string>();
  for (const [column, spec] of Object.entries(mapping)) {
    if (spec.trim() === '') continue;
    const index = header.indexOf(column.trim());
    if (index < 0) {
      fileErrors.push({ column, field: column, message: `column '${column}' is not in the header; the header has ${header.map((h) => `'${h}'`).join(', ')}` });
      continue;
    }
    try {
      const target = resolveTarget(column, spec, factors, responses, units);
      const key = targetKey(target);
      const earlier = seen.get(key);
      if (earlier !== undefined) {
        fileErrors.push({ column, field: key, message: `columns '${earlier}' and '${column}' are both mapped to ${key}; map one of them` });
        continue;
      }
      seen.set(key, column);
      columns.push({ index, column, target });
    } catch (e) {
      if (!(e instanceof DomainError)) throw e;
      fileErrors.push({ column, field: e.field ?? column, message: e.message });
    }
  }
  for (const f of factors) {
    if (!seen.has(`factor:${f.name}`)) fileErrors.push({ field: f.name, message: `factor '${f.name}' has no column; map the column that holds it` });
  }
  if (responses.length > 0 && !responses.some((r) => seen.has(`response:${r.name}`)) && ![...seen.keys()].some((k) => k.startsWith('reading:'))) {
    fileErrors.push({ field: '(mapping)', message: 'no response or standard reading is mapped; map at least one column to a response or a reading' });
  }
  // Which column holds each observation and trial field, to name it in the plausibility messages.
  const columnOf = new Map<string, string>();
  const entered: Record<string, { name: string; unit: string; toSi: number }> = {};
  for (const { column, target } of columns) {
    if (target.kind === 'reading') {
      columnOf.set(target.field.name, column);
      if (target.field.toSi !== null) entered[target.field.name] = { name: column, unit: units[column]?.trim() || target.field.unit, toSi: target.field.toSi * target.scale };
    } else if (target.kind === 'response') columnOf.set(target.response.name, column);
    else if (target.kind === 'field') columnOf.set(target.field, column);
  }
  const robots = options.robots ?? [];
  for (const e of parsed.errors.slice(0, 5)) {
    if (e.code === 'UndetectableDelimiter') continue;
    fileErrors.push({ field: '(file)', message: `CSV ${e.type.toLowerCase()} near row ${(e.row ?? 0) + 1}: ${e.message}` });
  }

  const now = options.now !== undefined ? Date.parse(options.now) : Number.NaN;
  const rows: ImportRow[] = [];
  // Line numbers: Papa gives records, not lines; count line breaks inside quoted cells.
  let line = 1 + 1 + (records[0] ?? []).reduce((a, cell) => a + (cell.match(/\n/g)?.length ?? 0), 0);
  for (let r = 1; r < records.length; r++) {
    const record = records[r]!;
    const rowLine = line;
    line += 1 + record.reduce((a, cell) => a + (cell.match(/\n/g)?.length ?? 0), 0);
    if (record.every((cell) => cell.trim() === '')) continue;
    const values: ImportedTrial = { factors: {}, responses: {}, readings: {} };
    const errors: ImportIssue[] = [];
    const warnings: ImportIssue[] = [];
    for (const { index, column, target } of columns) {
      const cell = (record[index] ?? '').trim();
      if (target.kind === 'factor') {
        const f = target.factor;
        if (cell === '') {
          errors.push({ column, field: f.name, message: `'${f.name}' is blank; every trial needs its factor settings` });
          continue;
        }
        if (f.kind === 'categorical') {
          const level = f.levels.find((l) => l === cell) ?? f.levels.find((l) => l.toLowerCase() === cell.toLowerCase());
          if (level === undefined) errors.push({ column, field: f.name, message: `'${cell}' is not a level of '${f.name}'; use one of ${f.levels.join(', ')}` });
          else values.factors[f.name] = level;
          continue;
        }
        const raw = parseNumberCell(cell, decimalComma);
        if (!Number.isFinite(raw)) {
          errors.push({ column, field: f.name, message: `'${cell}' is not a number; enter '${f.name}'${f.unit ? ` in ${units[column] ?? f.unit}` : ''}` });
          continue;
        }
        const v = raw * target.scale;
        if (f.kind === 'continuous') {
          const slack = RELATIVE_TOLERANCE * Math.max(1, Math.abs(f.high - f.low));
          if (v < f.low - slack || v > f.high + slack) {
            errors.push({ column, field: f.name, message: `${v} ${f.unit ?? ''} is outside the range of '${f.name}' [${f.low}, ${f.high}]; correct it or widen the factor's range`.replace('  ', ' ') });
            continue;
          }
          values.factors[f.name] = v;
        } else {
          const match = f.values.find((a) => Math.abs(a - v) <= RELATIVE_TOLERANCE * Math.max(1, Math.abs(a)));
          if (match === undefined) {
            errors.push({ column, field: f.name, message: `${v} is not an allowed value of '${f.name}'; use one of ${f.values.join(', ')}` });
            continue;
          }
          values.factors[f.name] = match as FactorValue;
        }
      } else if (target.kind === 'response') {
        const name = target.response.name;
        if (cell === '') {
          values.responses[name] = null;
          continue;
        }
        const raw = parseNumberCell(cell, decimalComma);
        if (!Number.isFinite(raw)) {
          errors.push({ column, field: name, message: `'${cell}' is not a number; enter the response '${name}' or leave the cell blank` });
          continue;
        }
        values.responses[name] = raw * target.scale;
      } else if (target.kind === 'reading') {
        const { name, unit, response } = target.field;
        const into = response ? values.responses : values.readings;
        if (cell === '') {
          into[name] = null;
          continue;
        }
        const raw = parseNumberCell(cell, decimalComma);
        if (!Number.isFinite(raw)) {
          errors.push({ column, field: name, message: `'${cell}' is not a number; enter ${name}${unit && unit !== 'count' ? ` in ${units[column]?.trim() || unit}` : ''} or leave the cell blank` });
          continue;
        }
        into[name] = raw * target.scale;
      } else {
        const field = target.field;
        if (cell === '') continue;
        if (field === 'passed') {
          const word = cell.toLowerCase();
          if (TRUE_WORDS.has(word)) values.passed = true;
          else if (FALSE_WORDS.has(word)) values.passed = false;
          else errors.push({ column, field, message: `'${cell}' is not pass or fail; write yes/no, pass/fail or true/false` });
        } else if (field === 'startedAt' || field === 'finishedAt') {
          const time = parseTimeCell(cell);
          if (!time) {
            errors.push({ column, field, message: `'${cell}' is not a date and time; write e.g. 2025-11-03T14:05:00Z or 2025-11-03 14:05` });
            continue;
          }
          if (!time.zoned) warnings.push({ column, field, message: `'${cell}' has no time zone; it was read as UTC` });
          if (Number.isFinite(now) && Date.parse(time.iso) > now) {
            errors.push({ column, field, message: `${field} '${cell}' is in the future; check the date` });
            continue;
          }
          values[field] = time.iso;
        } else if (field === 'failureReason') {
          const parsed = parseFailureReasonCell(cell);
          if ('error' in parsed) errors.push({ column, field, message: parsed.error });
          else values.failureReason = parsed.reason;
        } else {
          values[field] = cell;
        }
      }
    }
    // The rig's check of the readings and times (pass/fail follows the import's own rules below).
    const observations: Record<string, number> = {};
    for (const [name, v] of [...Object.entries(values.responses), ...Object.entries(values.readings)]) if (v !== null) observations[name] = v;
    const robot = values.robot ? robots.find((x) => x.name === values.robot) ?? robots.find((x) => x.name.toLowerCase() === values.robot!.toLowerCase()) : undefined;
    const check = checkTrialEntry(
      responses,
      observations,
      { passed: null, failureReason: null, startedAt: values.startedAt ?? null, finishedAt: values.finishedAt ?? null },
      { now: options.now ?? '', robotMassKg: robot ? robot.massGrams / 1000 : null, robotHeightM: robot?.heightMm ? robot.heightMm / 1000 : null, labels: entered },
    );
    const issue = (i: { field: string; message: string }): ImportIssue => {
      const field = i.field.replace(/^observations\./, '');
      const column = columnOf.get(field);
      return column === undefined ? { field, message: i.message } : { column, field, message: i.message };
    };
    errors.push(...check.errors.map(issue));
    warnings.push(...check.warnings.map(issue));
    if (values.passed === true && values.failureReason) {
      errors.push({ column: columnOf.get('failureReason'), field: 'failureReason', message: `the trial is marked passed but has the failure reason '${values.failureReason}'; clear the reason or mark the trial failed` });
    }
    if (values.passed === false && !values.failureReason) {
      warnings.push({ column: columnOf.get('passed'), field: 'failureReason', message: 'the trial failed but no failure reason is given' });
    }
    rows.push({ line: rowLine, values, errors, warnings });
  }
  if (rows.length === 0 && fileErrors.length === 0) fileErrors.push({ field: '(file)', message: 'the file has a header but no data rows' });
  const invalidCount = fileErrors.length > 0 ? rows.length : rows.filter((r) => r.errors.length > 0).length;
  return { fileErrors, rows, valid: fileErrors.length === 0 && invalidCount === 0, validCount: rows.length - invalidCount, invalidCount };
}

/**
 * The trials to store from a report: all of them when the file is valid; only the valid rows when the
 * user explicitly accepted that (`acceptValidRowsOnly`); otherwise a DomainError listing the first problems.
 */
export function trialsToStore(report: ImportReport, acceptValidRowsOnly = false): ImportedTrial[] {
  if (report.fileErrors.length > 0) {
    throw invalidInput(report.fileErrors[0]!.field, `the file cannot be imported: ${report.fileErrors[0]!.message}`, report.fileErrors);
  }
  if (report.valid) return report.rows.map((r) => r.values);
  if (!acceptValidRowsOnly) {
    const bad = report.rows.filter((r) => r.errors.length > 0).slice(0, 5);
    const first = bad[0]!;
    throw invalidInput(
      first.errors[0]!.field,
      `${report.invalidCount} of ${report.rows.length} rows are invalid (first on line ${first.line}: ${first.errors[0]!.message}); correct them or accept only the ${report.validCount} valid rows`,
      bad.map((r) => ({ line: r.line, errors: r.errors })),
    );
  }
  return report.rows.filter((r) => r.errors.length === 0).map((r) => r.values);
}
