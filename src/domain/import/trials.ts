/**
 * Import of past trials from a spreadsheet exported as CSV: a column mapping, unit conversion and a
 * row-by-row validation report. Nothing is decided about storage here; `trialsToStore` applies the
 * rule "the whole file is valid, or the user explicitly accepts only the valid rows".
 */
import Papa from 'papaparse';
import { DomainError, invalidInput } from '@/domain/errors';
import type { Factor, FactorValue, Point, ResponseDefinition } from '@/domain/factors';
import { conversionFactor } from '@/domain/metrics/units';

/** Trial fields that are neither factors nor responses. */
export const TRIAL_FIELDS = ['notes', 'startedAt', 'finishedAt', 'passed', 'failureReason', 'operator', 'robot', 'rig', 'runLabel'] as const;
export type TrialField = (typeof TRIAL_FIELDS)[number];

/**
 * Column name → what it holds: a factor name, a response name or a trial field; prefix with
 * `factor:`, `response:` or `field:` when a name is ambiguous. An empty string ignores the column.
 */
export type ImportMapping = Record<string, string>;
/** Column name → the unit its numbers are in (converted to the factor's or response's unit). */
export type ImportUnits = Record<string, string>;

export interface ImportOptions {
  /** Current time, ISO 8601: times after it are refused. */
  now?: string;
}

export interface ImportIssue {
  /** CSV column, when the issue concerns one. */
  column?: string;
  /** Factor, response or trial field concerned. */
  field: string;
  message: string;
}

export interface ImportedTrial {
  factors: Point;
  responses: Record<string, number | null>;
  notes?: string;
  startedAt?: string;
  finishedAt?: string;
  passed?: boolean;
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
  | { kind: 'field'; field: TrialField };

function resolveTarget(
  column: string, spec: string, factors: readonly Factor[], responses: readonly ResponseDefinition[], units: ImportUnits,
): Target {
  const [prefix, rest] = spec.includes(':') ? [spec.slice(0, spec.indexOf(':')), spec.slice(spec.indexOf(':') + 1)] : ['', spec];
  const name = rest.trim();
  const factor = prefix === '' || prefix === 'factor' ? factors.find((f) => f.name === name) : undefined;
  const response = prefix === '' || prefix === 'response' ? responses.find((r) => r.name === name) : undefined;
  const field = prefix === '' || prefix === 'field' ? (TRIAL_FIELDS as readonly string[]).includes(name) : false;
  const matches = [factor, response, field || undefined].filter(Boolean).length;
  if (matches === 0) {
    const known = [...factors.map((f) => f.name), ...responses.map((r) => r.name), ...TRIAL_FIELDS].join(', ');
    throw invalidInput(column, `column '${column}' is mapped to '${spec}', which is not a factor, response or trial field; use one of ${known}`);
  }
  if (matches > 1) throw invalidInput(column, `column '${column}': '${name}' names more than one thing; write factor:${name}, response:${name} or field:${name}`);
  const unit = units[column]?.trim();
  if (factor) {
    if (factor.kind === 'categorical') {
      if (unit) throw invalidInput(column, `column '${column}' holds the categorical factor '${factor.name}' and takes no unit`);
      return { kind: 'factor', factor, scale: 1 };
    }
    return { kind: 'factor', factor, scale: unit && factor.unit ? conversionFactor(unit, factor.unit, column) : 1 };
  }
  if (response) return { kind: 'response', response, scale: unit && response.unit ? conversionFactor(unit, response.unit, column) : 1 };
  return { kind: 'field', field: name as TrialField };
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
      const key = target.kind === 'factor' ? `factor:${target.factor.name}` : target.kind === 'response' ? `response:${target.response.name}` : `field:${target.field}`;
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
  if (!responses.some((r) => seen.has(`response:${r.name}`)) && responses.length > 0) {
    fileErrors.push({ field: '(mapping)', message: 'no response is mapped; map at least one column to a response' });
  }
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
    const values: ImportedTrial = { factors: {}, responses: {} };
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
        } else {
          values[field] = cell;
        }
      }
    }
    if (values.startedAt && values.finishedAt && Date.parse(values.finishedAt) < Date.parse(values.startedAt)) {
      errors.push({ field: 'finishedAt', message: 'finishedAt is before startedAt; swap or correct them' });
    }
    if (values.passed === false && !values.failureReason) {
      warnings.push({ field: 'failureReason', message: 'the trial failed but no failure reason is given' });
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
