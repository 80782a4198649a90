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

function slowNumber(bytes: Uint8Array, start: number, end: number): number {
  let s = '';
  for (let i = start; i < end; i++) s += String.fromCharCode(bytes[i]!);
  s = s.trim();
  if (s === '') return Number.NaN;
  const v = Number(s);
  return Number.isFinite(v) ? v : Number.NaN;
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

  const delim = delimiter.charCodeAt(0);
  const decimalAlt = delimiter === ',' ? 46 : 44;
  const roles = roleOfColumn.length;
  const end = bytes.length;
  let n = 0;
  let rows = 0;
  let dropped = 0;
  let v0 = 0, v1 = 0, v2 = 0, v3 = 0;
  pos = headerEnd + 1;
  // One pass over the bytes. Number reading is inlined: with at most 15 significant digits and a
  // decimal exponent within ±22 the result is one correctly rounded operation, identical to Number();
  // Clinger (1990), PLDI '90:92-101. Anything else falls back to Number() on the cell.
  while (pos < end) {
    let c = bytes[pos]!;
    if (c === NEWLINE) {
      pos++;
      continue;
    }
    if (c === CR && (pos + 1 >= end || bytes[pos + 1] === NEWLINE)) {
      pos += 2;
      continue;
    }
    v0 = v1 = v2 = v3 = Number.NaN;
    let column = 0;
    for (;;) {
      const role = column < roles ? roleOfColumn[column]! : -1;
      if (role >= 0) {
        let value = Number.NaN;
        let i = pos;
        c = i < end ? bytes[i]! : NEWLINE;
        if (c === QUOTE) {
          // Quoted cell: read up to the closing quote, then parse the inside.
          let q = i + 1;
          while (q < end && bytes[q] !== QUOTE) q++;
          value = slowNumber(bytes, i + 1, q);
          i = q + 1;
        } else {
          while (c === SPACE) c = ++i < end ? bytes[i]! : NEWLINE;
          let negative = false;
          if (c === 45 /* - */) {
            negative = true;
            c = ++i < end ? bytes[i]! : NEWLINE;
          } else if (c === 43 /* + */) c = ++i < end ? bytes[i]! : NEWLINE;
          const numberStart = i;
          let mantissa = 0;
          let digits = 0;
          let exponent = 0;
          let sawDigit = false;
          let exact = true;
          while (c >= 48 && c <= 57) {
            sawDigit = true;
            if (digits < 15) {
              mantissa = mantissa * 10 + (c - 48);
              if (mantissa !== 0) digits++;
            } else {
              exponent++;
              if (c !== 48) exact = false;
            }
            c = ++i < end ? bytes[i]! : NEWLINE;
          }
          if (c === 46 || c === decimalAlt) {
            c = ++i < end ? bytes[i]! : NEWLINE;
            while (c >= 48 && c <= 57) {
              sawDigit = true;
              if (digits < 15) {
                mantissa = mantissa * 10 + (c - 48);
                if (mantissa !== 0) digits++;
                exponent--;
              } else if (c !== 48) exact = false;
              c = ++i < end ? bytes[i]! : NEWLINE;
            }
          }
          if (sawDigit && (c === 101 || c === 69) /* e E */) {
            let j = i + 1;
            let d = j < end ? bytes[j]! : NEWLINE;
            let expNegative = false;
            if (d === 45) {
              expNegative = true;
              d = ++j < end ? bytes[j]! : NEWLINE;
            } else if (d === 43) d = ++j < end ? bytes[j]! : NEWLINE;
            if (d >= 48 && d <= 57) {
              let e = 0;
              while (d >= 48 && d <= 57) {
                if (e < 100000) e = e * 10 + (d - 48);
                d = ++j < end ? bytes[j]! : NEWLINE;
              }
              exponent += expNegative ? -e : e;
              i = j;
              c = d;
            }
          }
          const numberEnd = i;
          while (c === SPACE) c = ++i < end ? bytes[i]! : NEWLINE;
          if (sawDigit && (c === delim || c === NEWLINE || c === CR)) {
            if (exact && exponent === 0) value = mantissa;
            else if (exact && exponent < 0 && exponent >= -22) value = mantissa / POW10[-exponent]!;
            else if (exact && exponent > 0 && exponent <= 22) value = mantissa * POW10[exponent]!;
            else if (exact && mantissa === 0) value = 0;
            else value = slowNumber(bytes, numberStart, numberEnd);
            if (negative) value = -value;
          }
        }
        pos = i;
        if (role === 0) v0 = value;
        else if (role === 1) v1 = value;
        else if (role === 2) v2 = value;
        else v3 = value;
      }
      // Move to the end of this cell.
      while (pos < end) {
        c = bytes[pos]!;
        if (c === delim || c === NEWLINE) break;
        pos++;
      }
      if (pos >= end || c === NEWLINE) {
        pos++;
        break;
      }
      pos++;
      column++;
      if (column > lastWanted) {
        // Skip the rest of the line.
        const nl = bytes.indexOf(NEWLINE, pos);
        pos = nl < 0 ? end : nl + 1;
        break;
      }
    }
    rows++;
    // NaN fails every comparison: one test catches any missing value.
    if (v0 === v0 && v1 === v1 && v2 === v2 && v3 === v3) {
      t[n] = v0 * timeScale;
      x[n] = v1 * lengthScale;
      y[n] = v2 * lengthScale;
      z[n] = v3 * lengthScale;
      n++;
    } else dropped++;
  }
  return { t: t.subarray(0, n), x: x.subarray(0, n), y: y.subarray(0, n), z: z.subarray(0, n), length: n, rows, droppedRows: dropped, header, delimiter };
}
