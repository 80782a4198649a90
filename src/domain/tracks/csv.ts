/**
 * Reading a motion track from CSV bytes: a hand-tuned byte-level number parser that reads only the
 * mapped columns into typed arrays, from one buffer or from chunks as they arrive. It is the hot path
 * for long tracks (bench/cases/tracks.ts shows why a general CSV library is not used here). Cells that
 * are blank or not numbers (NaN, NA, null) make the row a dropout; such rows are counted and skipped.
 */
import { invalidInput } from '@/domain/errors';

export interface TrackColumns {
  time: string;
  x: string;
  y: string;
  z: string;
  /** Further numeric columns read as they are (e.g. orientation); a blank cell there is NaN, not a dropout. */
  extra?: string[];
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
  /** Values of the `extra` columns, in their order, per kept sample (unscaled). */
  extra: Float64Array[];
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
  /** Expected total size in bytes, to size the sample arrays once (optional). */
  sizeHint?: number;
}

interface Layout {
  header: string[];
  delimiter: string;
  /** Role of each column: 0 time, 1 x, 2 y, 3 z, −1 not read. */
  roles: Int8Array;
  lastWanted: number;
}

function layoutFromHeader(line: string, columns: TrackColumns): Layout {
  if (line.trim() === '') throw invalidInput('(body)', 'the CSV is empty; send a header line and one row per sample');
  const delimiter = pickDelimiter(line);
  const header = headerCells(line, delimiter);
  const roles = new Int8Array(header.length).fill(-1);
  const fields: ['time' | 'x' | 'y' | 'z', number][] = [['time', 0], ['x', 1], ['y', 2], ['z', 3]];
  for (const [field, role] of fields) {
    const at = findColumn(header, columns[field], field);
    if (roles[at] !== -1) throw invalidInput(field, `${field}: column '${columns[field]}' is already mapped to another coordinate; map each to its own column`);
    roles[at] = role;
  }
  (columns.extra ?? []).forEach((name, e) => {
    const at = findColumn(header, name, `extra[${e}]`);
    if (roles[at] !== -1) throw invalidInput(name, `${name}: column '${name}' is already mapped; map each column once`);
    roles[at] = 4 + e;
  });
  let lastWanted = 0;
  for (let k = 0; k < roles.length; k++) if (roles[k] !== -1) lastWanted = k;
  return { header, delimiter, roles, lastWanted };
}

/**
 * Streaming reader: `push` chunks of a track CSV in order, then `finish`. Lines may be split across
 * chunks. The first line is the header; the delimiter is the most frequent of comma, semicolon and tab
 * in it. With a semicolon or tab delimiter a decimal comma is accepted too.
 */
export class TrackCsvReader {
  private readonly columns: TrackColumns;
  private readonly timeScale: number;
  private readonly lengthScale: number;
  private readonly sizeHint: number;
  private layout: Layout | null = null;
  private carry: Uint8Array = new Uint8Array(0);
  private started = false;
  private t = new Float64Array(0);
  private x = new Float64Array(0);
  private y = new Float64Array(0);
  private z = new Float64Array(0);
  private extra: Float64Array[] = [];
  private n = 0;
  private rows = 0;
  private dropped = 0;

  constructor(columns: TrackColumns, options: ParseTrackOptions = {}) {
    this.columns = columns;
    this.timeScale = options.timeScale ?? 1;
    this.lengthScale = options.lengthScale ?? 1;
    this.sizeHint = options.sizeHint ?? 0;
  }

  /** Add the next chunk of the file. */
  push(chunk: Uint8Array): void {
    let from = 0;
    if (!this.started) {
      this.started = true;
      if (chunk[0] === 0xef && chunk[1] === 0xbb && chunk[2] === 0xbf) from = 3;
    }
    const lastNewline = chunk.lastIndexOf(NEWLINE);
    if (lastNewline < from) {
      this.carry = concat(this.carry, chunk.subarray(from));
      return;
    }
    if (this.carry.length > 0) {
      // Finish the line begun in an earlier chunk.
      const firstNewline = chunk.indexOf(NEWLINE, from);
      this.lines(concat(this.carry, chunk.subarray(from, firstNewline + 1)), 0);
      this.carry = new Uint8Array(0);
      from = firstNewline + 1;
    }
    if (from <= lastNewline) this.lines(chunk.subarray(0, lastNewline + 1), from);
    // Copy the unfinished line: the caller may reuse the chunk's memory (and Buffer#slice does not copy).
    this.carry = concat(new Uint8Array(0), chunk.subarray(lastNewline + 1));
  }

  /** The samples read; the reader is spent afterwards. */
  finish(): ParsedTrack {
    if (this.carry.length > 0) {
      const last = new Uint8Array(this.carry.length + 1);
      last.set(this.carry);
      last[this.carry.length] = NEWLINE;
      this.carry = new Uint8Array(0);
      this.lines(last, 0);
    }
    if (!this.layout) throw invalidInput('(body)', 'the CSV is empty; send a header line and one row per sample');
    const n = this.n;
    return {
      t: this.t.subarray(0, n), x: this.x.subarray(0, n), y: this.y.subarray(0, n), z: this.z.subarray(0, n),
      length: n, rows: this.rows, droppedRows: this.dropped, header: this.layout.header, delimiter: this.layout.delimiter,
      extra: this.extra.map((a) => a.subarray(0, n)),
    };
  }

  private grow(bytes: Uint8Array, from: number): void {
    let capacity: number;
    if (this.t.length === 0) {
      // Estimate rows from the bytes per line of the first lines and the expected size.
      let lines = 0;
      let p = from;
      const probeEnd = Math.min(bytes.length, from + 65536);
      while (p < probeEnd) {
        const q = bytes.indexOf(NEWLINE, p);
        if (q < 0 || q >= probeEnd) break;
        lines++;
        p = q + 1;
      }
      const perLine = lines > 0 ? (p - from) / lines : 64;
      capacity = Math.ceil((Math.max(this.sizeHint, bytes.length - from) / Math.max(perLine, 4)) * 1.02) + 16;
    } else capacity = Math.ceil(this.t.length * 1.5) + 16;
    const resize = (a: Float64Array) => {
      const b = new Float64Array(capacity);
      b.set(a.subarray(0, this.n));
      return b;
    };
    this.t = resize(this.t);
    this.x = resize(this.x);
    this.y = resize(this.y);
    this.z = resize(this.z);
    const extraCount = this.columns.extra?.length ?? 0;
    this.extra = Array.from({ length: extraCount }, (_, e) => resize(this.extra[e] ?? new Float64Array(0)));
  }

  /** Parse whole lines bytes[from..end), where the last byte is a newline. */
  private lines(bytes: Uint8Array, from: number): void {
    let pos = from;
    if (!this.layout) {
      // Skip blank lines, then read the header.
      while (bytes[pos] === NEWLINE || bytes[pos] === CR) {
        pos++;
        if (pos >= bytes.length) return;
      }
      const headerEnd = bytes.indexOf(NEWLINE, pos);
      const line = new TextDecoder().decode(bytes.subarray(pos, headerEnd)).replace(/\r$/, '');
      this.layout = layoutFromHeader(line, this.columns);
      pos = headerEnd + 1;
    }
    if (pos >= bytes.length) return;
    if (this.t.length === 0) this.grow(bytes, pos);
    const { roles, lastWanted, delimiter } = this.layout;
    const delim = delimiter.charCodeAt(0);
    const decimalAlt = delimiter === ',' ? 46 : 44;
    const roleCount = roles.length;
    const timeScale = this.timeScale;
    const lengthScale = this.lengthScale;
    const end = bytes.length;
    let t = this.t, x = this.x, y = this.y, z = this.z;
    let capacity = t.length;
    let n = this.n;
    let rows = this.rows;
    let dropped = this.dropped;
    let v0 = 0, v1 = 0, v2 = 0, v3 = 0;
    const extraValues = new Float64Array(this.columns.extra?.length ?? 0);
    let extra = this.extra;
    // Every line ends with a newline inside [from, end): each scan below stops at one, so no scan
    // needs a bounds check. Number reading is inlined: with at most 15 significant digits and a
    // decimal exponent within ±22 the result is one correctly rounded operation, identical to Number();
    // Clinger (1990), PLDI '90:92-101 (citation from memory). Anything else falls back to Number() on the cell.
    while (pos < end) {
      let c = bytes[pos]!;
      if (c === NEWLINE) {
        pos++;
        continue;
      }
      if (c === CR && bytes[pos + 1] === NEWLINE) {
        pos += 2;
        continue;
      }
      v0 = v1 = v2 = v3 = Number.NaN;
      if (extraValues.length > 0) extraValues.fill(Number.NaN);
      let column = 0;
      for (;;) {
        const role = column < roleCount ? roles[column]! : -1;
        if (role >= 0) {
          let value = Number.NaN;
          let i = pos;
          c = bytes[i]!;
          if (c === QUOTE) {
            // Quoted cell: read up to the closing quote (or the line end), then parse the inside.
            let q = i + 1;
            while (bytes[q] !== QUOTE && bytes[q] !== NEWLINE) q++;
            value = slowNumber(bytes, i + 1, q);
            i = bytes[q] === QUOTE ? q + 1 : q;
          } else {
            while (c === SPACE) c = bytes[++i]!;
            let negative = false;
            if (c === 45 /* - */) {
              negative = true;
              c = bytes[++i]!;
            } else if (c === 43 /* + */) c = bytes[++i]!;
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
              c = bytes[++i]!;
            }
            if (c === 46 || c === decimalAlt) {
              c = bytes[++i]!;
              while (c >= 48 && c <= 57) {
                sawDigit = true;
                if (digits < 15) {
                  mantissa = mantissa * 10 + (c - 48);
                  if (mantissa !== 0) digits++;
                  exponent--;
                } else if (c !== 48) exact = false;
                c = bytes[++i]!;
              }
            }
            if (sawDigit && (c === 101 || c === 69) /* e E */) {
              let j = i + 1;
              let d = bytes[j]!;
              let expNegative = false;
              if (d === 45) {
                expNegative = true;
                d = bytes[++j]!;
              } else if (d === 43) d = bytes[++j]!;
              if (d >= 48 && d <= 57) {
                let e = 0;
                while (d >= 48 && d <= 57) {
                  if (e < 100000) e = e * 10 + (d - 48);
                  d = bytes[++j]!;
                }
                exponent += expNegative ? -e : e;
                i = j;
                c = d;
              }
            }
            const numberEnd = i;
            while (c === SPACE) c = bytes[++i]!;
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
          else if (role === 3) v3 = value;
          else extraValues[role - 4] = value;
        }
        // Move to the end of this cell.
        c = bytes[pos]!;
        while (c !== delim && c !== NEWLINE) c = bytes[++pos]!;
        pos++;
        if (c === NEWLINE) break;
        column++;
        if (column > lastWanted) {
          // Skip the rest of the line.
          pos = bytes.indexOf(NEWLINE, pos) + 1;
          break;
        }
      }
      rows++;
      // NaN fails every comparison: one test catches any missing value.
      if (v0 === v0 && v1 === v1 && v2 === v2 && v3 === v3) {
        if (n === capacity) {
          this.n = n;
          this.grow(bytes, pos);
          t = this.t;
          x = this.x;
          y = this.y;
          z = this.z;
          extra = this.extra;
          capacity = t.length;
        }
        t[n] = v0 * timeScale;
        x[n] = v1 * lengthScale;
        y[n] = v2 * lengthScale;
        z[n] = v3 * lengthScale;
        for (let e = 0; e < extraValues.length; e++) extra[e]![n] = extraValues[e]!;
        n++;
      } else dropped++;
    }
    this.n = n;
    this.rows = rows;
    this.dropped = dropped;
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

/** Parse the mapped columns of a whole track CSV held as bytes (UTF-8 or ASCII); see `TrackCsvReader`. */
export function parseTrackCsv(bytes: Uint8Array, columns: TrackColumns, options: ParseTrackOptions = {}): ParsedTrack {
  const reader = new TrackCsvReader(columns, { sizeHint: bytes.length, ...options });
  reader.push(bytes);
  return reader.finish();
}
