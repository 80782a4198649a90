/**
 * Reading a motion track from CSV bytes: a hand-tuned byte-level number parser that reads only the
 * mapped columns into typed arrays. It is the hot path for long tracks (bench/cases/tracks.ts shows
 * why a general CSV library is not used here). Cells that are blank or not numbers (NaN, NA, null)
 * make the row a dropout; such rows are counted and skipped.
 */
import { invalidInput } from '@/domain/errors';

export interface TrackColumns {
  time: string;
  x: string;
  y: string;
  z: string;
}

export interface ParsedTrack {
  /** Sample times in the file's unit times `timeScale`. */
  t: Float64Array;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Number of samples kept. */
  length: number;
  /** Data rows seen (blank lines excluded). */
  rows: number;
  /** Data rows skipped because a mapped cell was blank or not a number. */
  droppedRows: number;
  /** Header cells as read (trimmed, quotes removed). */
  header: string[];
  delimiter: string;
}

const NEWLINE = 10;
const CR = 13;
const QUOTE = 34;
const SPACE = 32;

// Exact powers of ten: every 10^k with k ≤ 22 is a double without rounding.
const POW10 = new Float64Array(23);
for (let k = 0, p = 1; k < 23; k++, p *= 10) POW10[k] = p;

/** Position just after the last parsed character; set by `parseNumber`. */
let cursor = 0;

function slowNumber(bytes: Uint8Array, start: number, end: number): number {
  let s = '';
  for (let i = start; i < end; i++) s += String.fromCharCode(bytes[i]!);
  s = s.trim();
  if (s === '') return Number.NaN;
  const v = Number(s);
  return Number.isFinite(v) ? v : Number.NaN;
}

/**
 * Parse a decimal number starting at `start`, stopping at the first byte that cannot continue it;
 * sets `cursor` there. Returns NaN when no digit is found. With at most 15 significant digits and a
 * decimal exponent within ±22 the result is one correctly rounded operation, identical to Number()
 * (Clinger (1990), PLDI, "How to read floating point numbers accurately"); otherwise it falls back to Number().
 */
function parseNumber(bytes: Uint8Array, start: number, end: number, decimalAlt: number): number {
  let i = start;
  let c = bytes[i]!;
  while (i < end && c === SPACE) c = bytes[++i]!;
  let negative = false;
  if (c === 45 /* - */) {
    negative = true;
    c = bytes[++i]!;
  } else if (c === 43 /* + */) c = bytes[++i]!;
  let mantissa = 0;
  let digits = 0;
  let exponent = 0;
  let sawDigit = false;
  let exact = true;
  const numberStart = i;
  while (i < end && c >= 48 && c <= 57) {
    sawDigit = true;
    if (mantissa !== 0 || c !== 48) {
      if (digits < 15) {
        mantissa = mantissa * 10 + (c - 48);
        digits++;
      } else {
        exponent++;
        if (c !== 48) exact = false;
      }
    }
    c = bytes[++i]!;
  }
  if (i < end && (c === 46 || c === decimalAlt)) {
    c = bytes[++i]!;
    while (i < end && c >= 48 && c <= 57) {
      sawDigit = true;
      if (mantissa !== 0 || c !== 48) {
        if (digits < 15) {
          mantissa = mantissa * 10 + (c - 48);
          digits++;
          exponent--;
        } else if (c !== 48) exact = false;
      } else exponent--;
      c = bytes[++i]!;
    }
  }
  if (!sawDigit) {
    cursor = i;
    return Number.NaN;
  }
  if (i < end && (c === 101 || c === 69) /* e E */) {
    let j = i + 1;
    let d = bytes[j]!;
    let expNegative = false;
    if (d === 45) {
      expNegative = true;
      d = bytes[++j]!;
    } else if (d === 43) d = bytes[++j]!;
    if (j < end && d >= 48 && d <= 57) {
      let e = 0;
      while (j < end && d >= 48 && d <= 57) {
        if (e < 100000) e = e * 10 + (d - 48);
        d = bytes[++j]!;
      }
      exponent += expNegative ? -e : e;
      i = j;
    }
  }
  cursor = i;
  if (!exact || digits > 15) {
    const v = slowNumber(bytes, numberStart, i);
    return negative ? -v : v;
  }
  let v: number;
  if (exponent === 0) v = mantissa;
  else if (exponent < 0 && exponent >= -22) v = mantissa / POW10[-exponent]!;
  else if (exponent > 0 && exponent <= 22) v = mantissa * POW10[exponent]!;
  else if (mantissa === 0) v = 0;
  else {
    const s = slowNumber(bytes, numberStart, i);
    return negative ? -s : s;
  }
  return negative ? -v : v;
}

function headerCells(line: string, delimiter: string): string[] {
  return line.split(delimiter).map((cell) => {
    const s = cell.trim();
    return s.length >= 2 && s.startsWith('"') && s.endsWith('"') ? s.slice(1, -1).replace(/""/g, '"').trim() : s;
  });
}

function pickDelimiter(line: string): string {
  let best = ',';
  let bestCount = 0;
  for (const d of [',', ';', '\t']) {
    const count = line.split(d).length - 1;
    if (count > bestCount) {
      best = d;
      bestCount = count;
    }
  }
  return best;
}

function findColumn(header: string[], wanted: string, field: string): number {
  const name = wanted.trim();
  let at = header.indexOf(name);
  if (at < 0) {
    const lower = name.toLowerCase();
    at = header.findIndex((h) => h.toLowerCase() === lower);
  }
  if (at < 0) {
    const shown = header.slice(0, 20).map((h) => `'${h}'`).join(', ');
    throw invalidInput(field, `${field}: column '${wanted}' is not in the CSV header; the header has ${shown}`);
  }
  return at;
}

export interface ParseTrackOptions {
  /** Multiply times by this to get seconds (default 1). */
  timeScale?: number;
  /** Multiply lengths by this to get metres (default 1). */
  lengthScale?: number;
}

/**
 * Parse the mapped columns of a track CSV held as bytes (UTF-8 or ASCII). The first line is the
 * header; the delimiter is the most frequent of comma, semicolon and tab in it. With a semicolon or tab
 * delimiter a decimal comma is accepted too.
 */
export function parseTrackCsv(bytes: Uint8Array, columns: TrackColumns, options: ParseTrackOptions = {}): ParsedTrack {
  const timeScale = options.timeScale ?? 1;
  const lengthScale = options.lengthScale ?? 1;
  let pos = 0;
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) pos = 3;
  // Skip blank lines before the header.
  while (pos < bytes.length && (bytes[pos] === NEWLINE || bytes[pos] === CR)) pos++;
  let headerEnd = bytes.indexOf(NEWLINE, pos);
  if (headerEnd < 0) headerEnd = bytes.length;
  const headerLine = new TextDecoder().decode(bytes.subarray(pos, headerEnd)).replace(/\r$/, '');
  if (headerLine.trim() === '') throw invalidInput('(body)', 'the CSV is empty; send a header line and one row per sample');
  const delimiter = pickDelimiter(headerLine);
  const header = headerCells(headerLine, delimiter);
  const roleOfColumn = new Int8Array(header.length).fill(-1);
  const fields: [keyof TrackColumns, number][] = [['time', 0], ['x', 1], ['y', 2], ['z', 3]];
  for (const [field, role] of fields) {
    const at = findColumn(header, columns[field], field);
    if (roleOfColumn[at] !== -1) throw invalidInput(field, `${field}: column '${columns[field]}' is already mapped to another coordinate; map each to its own column`);
    roleOfColumn[at] = role;
  }
  let lastWanted = 0;
  for (let k = 0; k < roleOfColumn.length; k++) if (roleOfColumn[k] !== -1) lastWanted = k;

  // Capacity: one sample per newline (plus a last line without one).
  let capacity = 1;
  for (let p = bytes.indexOf(NEWLINE, headerEnd + 1); p >= 0; p = bytes.indexOf(NEWLINE, p + 1)) capacity++;
  const t = new Float64Array(capacity);
  const x = new Float64Array(capacity);
  const y = new Float64Array(capacity);
  const z = new Float64Array(capacity);
  const values = new Float64Array(4);

  const delim = delimiter.charCodeAt(0);
  const decimalAlt = delimiter === ',' ? 46 : 44;
  const end = bytes.length;
  let n = 0;
  let rows = 0;
  let dropped = 0;
  pos = headerEnd + 1;
  while (pos < end) {
    // Blank line?
    let c = bytes[pos]!;
    if (c === NEWLINE) {
      pos++;
      continue;
    }
    if (c === CR && (pos + 1 >= end || bytes[pos + 1] === NEWLINE)) {
      pos += 2;
      continue;
    }
    values[0] = values[1] = values[2] = values[3] = Number.NaN;
    let column = 0;
    let fieldStart = pos;
    // Walk the fields of this line.
    for (;;) {
      const role = column < roleOfColumn.length ? roleOfColumn[column]! : -1;
      let p = fieldStart;
      if (role >= 0) {
        c = bytes[p]!;
        if (c === QUOTE) {
          // Quoted cell: read up to the closing quote, then parse the inside.
          let q = p + 1;
          while (q < end && bytes[q] !== QUOTE) q++;
          values[role] = slowNumber(bytes, p + 1, q);
          p = q + 1;
        } else {
          const v = parseNumber(bytes, p, end, decimalAlt);
          p = cursor;
          while (p < end && bytes[p] === SPACE && bytes[p] !== delim) p++;
          c = p < end ? bytes[p]! : NEWLINE;
          values[role] = c === delim || c === NEWLINE || c === CR ? v : Number.NaN;
        }
      }
      // Move to the end of this field.
      while (p < end) {
        c = bytes[p]!;
        if (c === delim || c === NEWLINE) break;
        p++;
      }
      if (p >= end || bytes[p] === NEWLINE) {
        pos = p + 1;
        break;
      }
      column++;
      fieldStart = p + 1;
      if (column > lastWanted) {
        // Skip the rest of the line.
        const nl = bytes.indexOf(NEWLINE, fieldStart);
        pos = nl < 0 ? end : nl + 1;
        break;
      }
    }
    rows++;
    const tv = values[0]!;
    const xv = values[1]!;
    const yv = values[2]!;
    const zv = values[3]!;
    // NaN fails every comparison: one test catches any missing value.
    if (tv === tv && xv === xv && yv === yv && zv === zv) {
      t[n] = tv * timeScale;
      x[n] = xv * lengthScale;
      y[n] = yv * lengthScale;
      z[n] = zv * lengthScale;
      n++;
    } else dropped++;
  }
  return { t: t.subarray(0, n), x: x.subarray(0, n), y: y.subarray(0, n), z: z.subarray(0, n), length: n, rows, droppedRows: dropped, header, delimiter };
}
