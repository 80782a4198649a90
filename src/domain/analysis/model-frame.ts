/**
 * From request rows to a model matrix: factors (given or inferred), coding, the compiled model,
 * the response vector, and the low-order parts of product columns for accurate refinement.
 */
import { invalidInput } from '../errors';
import {
  INTERCEPT,
  compileModel,
  levelIndex,
  parseTerm,
  type CompiledModel,
  type Factor,
  type ModelTerm,
} from '../factors';
import { productRemainder } from './compensated';
import { largeColumnArray } from './tall-qr';
import type { AnalysisRequest, Coding, DataRow } from './types';

export interface ModelFrame {
  factors: Factor[];
  coding: Coding;
  intercept: boolean;
  /** Parsed terms, intercept first when present. */
  terms: ModelTerm[];
  model: CompiledModel;
  n: number;
  p: number;
  /** Column-major n × p model matrix. */
  x: Float64Array;
  y: Float64Array;
  /** Per used row, the factor vector as entered into the model (coded or natural; level index for categorical). */
  readonly points: Float64Array[];
  /** The same vectors, row-major n × factors.length (built on first use). */
  readonly pointMatrix: Float64Array;
  /** Factor values column by column (length n each), in the order of `factors`. */
  factorColumns: Float64Array[];
  /** Indices into request.data of the rows used, and of rows left out for an empty response. */
  rowIndex: number[];
  excludedRows: number[];
  /** Low-order parts of product columns (x^10, x1*x2, ...), computed on demand. */
  lowParts(): Float64Array | null;
}

function isMissing(v: unknown): boolean {
  return v === undefined || v === null || (typeof v === 'string' && v.trim() === '');
}

function asNumber(v: unknown): number {
  if (typeof v === 'number') return v;
  if (typeof v === 'string' && v.trim() !== '') return Number(v);
  return NaN;
}

/**
 * Numeric columns read in one pass over the rows (row by row keeps each object in cache): a
 * number where the cell holds a finite number, NaN elsewhere (missing, text or numeric text).
 */
export function numericColumns(data: readonly DataRow[], names: readonly string[]): Float64Array[] {
  const m = names.length;
  const cols = names.map(() => new Float64Array(data.length));
  for (let i = 0; i < data.length; i++) {
    const row = data[i];
    if (row === null || typeof row !== 'object') {
      for (let j = 0; j < m; j++) cols[j]![i] = NaN;
      continue;
    }
    for (let j = 0; j < m; j++) {
      const v = row[names[j]!];
      cols[j]![i] = typeof v === 'number' ? v : NaN;
    }
  }
  return cols;
}

/** Factors for the names used in the terms, inferred from the data: numeric columns are continuous, others categorical. */
export function inferFactors(data: readonly DataRow[], names: readonly string[], columns?: Float64Array[]): Factor[] {
  const cols = columns ?? numericColumns(data, names);
  return names.map((name, nameIndex) => {
    // Fast path: every cell a finite number.
    const col = cols[nameIndex]!;
    let lo = Infinity;
    let hi = -Infinity;
    let allNumbers = col.length > 0;
    for (let i = 0; i < col.length; i++) {
      const v = col[i]!;
      if (v !== v || v === Infinity || v === -Infinity) {
        allNumbers = false;
        break;
      }
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (allNumbers) return { name, kind: 'continuous', low: lo, high: hi } as Factor;
    let numeric = true;
    let seen = false;
    let low = Infinity;
    let high = -Infinity;
    const levels: string[] = [];
    const levelSet = new Set<string>();
    for (const row of data) {
      const v = row[name];
      if (isMissing(v)) continue;
      seen = true;
      const num = typeof v === 'number' ? v : asNumber(v);
      if (Number.isFinite(num)) {
        if (num < low) low = num;
        if (num > high) high = num;
      } else {
        numeric = false;
        break;
      }
    }
    if (!seen) throw invalidInput('terms', `term names "${name}", but no row of data has a value in column "${name}"`);
    if (numeric) return { name, kind: 'continuous', low, high } as Factor;
    for (const row of data) {
      const v = row[name];
      if (isMissing(v)) continue;
      const label = String(v);
      if (!levelSet.has(label)) {
        levelSet.add(label);
        levels.push(label);
      }
    }
    if (levels.length < 2) throw invalidInput('terms', `categorical column "${name}" has a single level (${levels[0]}); it cannot enter a model`);
    return { name, kind: 'categorical', levels } as Factor;
  });
}

export function buildModelFrame(request: AnalysisRequest): ModelFrame {
  const { data, response } = request;
  if (!Array.isArray(data) || data.length === 0) throw invalidInput('data', 'data has no rows; send one object per run');
  if (!Array.isArray(request.terms)) throw invalidInput('terms', 'terms must be a list of model terms, e.g. ["x1", "x2", "x1*x2"]');
  let intercept = request.intercept ?? true;
  const parsed: ModelTerm[] = [];
  const seen = new Set<string>();
  request.terms.forEach((text, i) => {
    const t = parseTerm(String(text), request.factors, `terms[${i}]`);
    if (t.parts.length === 0) {
      intercept = true;
      return;
    }
    if (!seen.has(t.label)) {
      seen.add(t.label);
      parsed.push(t);
    }
  });
  if (parsed.length === 0 && !intercept) throw invalidInput('terms', 'the model has no terms; name at least one term or keep the intercept');
  const usedNames: string[] = [];
  for (const t of parsed) for (const part of t.parts) if (!usedNames.includes(part.name)) usedNames.push(part.name);
  if (usedNames.includes(response)) throw invalidInput('response', `the response "${response}" also appears among the terms; a response cannot explain itself`);

  const given = request.factors;
  const fast = numericFrame(request, intercept, parsed, usedNames);
  if (fast) return fast;
  const columns = numericColumns(data, [...usedNames, response]);
  const factors: Factor[] = given ? usedNames.map((nm) => given.find((f) => f.name === nm)!) : inferFactors(data, usedNames, columns);
  const coding: Coding = request.coding ?? (given ? 'coded' : 'natural');
  checkCoding(factors, coding);
  const terms = intercept ? [INTERCEPT, ...parsed] : parsed;
  const model = compileModel(factors, terms);
  const p = model.p;
  const rowIndex: number[] = [];
  const excludedRows: number[] = [];
  const k = factors.length;
  const yAll = new Float64Array(data.length);
  const numericCoding = factors.map((f) => codingOf(f, coding));
  const names = factors.map((f) => f.name);
  const fastColumns = factors.map((f, j) => (f.kind === 'categorical' ? null : columns[j]!));
  const yColumn = columns[usedNames.length]!;
  // Runs used: those with a response.
  for (let i = 0; i < data.length; i++) {
    const row = data[i];
    if (row === null || typeof row !== 'object') throw invalidInput(`data[${i}]`, `data[${i}] must be an object of column values`);
    const fy = yColumn[i]!;
    const rv = Number.isFinite(fy) ? fy : row[response];
    if (isMissing(rv)) {
      excludedRows.push(i);
      continue;
    }
    const yv = typeof rv === 'number' ? rv : asNumber(rv);
    if (!Number.isFinite(yv)) throw invalidInput(`data[${i}].${response}`, `response ${response} in row ${i} must be a finite number, got "${String(rv)}"`);
    yAll[rowIndex.length] = yv;
    rowIndex.push(i);
  }
  const n = rowIndex.length;
  if (n === 0) throw invalidInput('data', `no row has a value for the response "${response}"`);
  // Factor values column by column (coded or natural; level index for categorical factors).
  const factorColumns = factors.map((f, j) => {
    const col = new Float64Array(n);
    const fast = fastColumns[j];
    const c = numericCoding[j];
    for (let t = 0; t < n; t++) {
      const i = rowIndex[t]!;
      const fv = fast ? fast[i]! : NaN;
      if (fv === fv && fv !== Infinity && fv !== -Infinity) {
        col[t] = c ? (2 * (fv - c.low)) / c.range - 1 : fv;
        continue;
      }
      const v = data[i]![names[j]!];
      try {
        if (isMissing(v)) throw invalidInput(f.name, `missing value for factor ${f.name}; give a value for every factor`);
        if (f.kind === 'categorical') col[t] = levelIndex(f, v as string | number);
        else {
          const num = asNumber(v);
          if (!Number.isFinite(num)) throw invalidInput(f.name, `${f.name} must be a finite number, got "${String(v)}"`);
          col[t] = c ? (2 * (num - c.low)) / c.range - 1 : num;
        }
      } catch (e) {
        const msg = e instanceof Error ? e.message : String(e);
        throw invalidInput(`data[${i}].${f.name}`, `row ${i}: ${msg}`);
      }
    }
    return col;
  });
  let valuesCache: Float64Array | undefined;
  const valuesOf = (): Float64Array => {
    if (valuesCache) return valuesCache;
    const v = new Float64Array(Math.max(1, n * k));
    for (let t = 0; t < n; t++) for (let j = 0; j < k; j++) v[t * k + j] = factorColumns[j]![t]!;
    return (valuesCache = v);
  };
  const x = largeColumnArray(n * p);
  if (factors.every((f) => f.kind !== 'categorical')) {
    // Column by column: each column is a product of factor powers.
    let col = 0;
    const factorIdx = new Map(names.map((nm, j) => [nm, j]));
    for (const t of terms) {
      const off = col * n;
      x.fill(1, off, off + n);
      for (const part of t.parts) {
        const src = factorColumns[factorIdx.get(part.name)!]!;
        const pw = part.power;
        for (let i = 0; i < n; i++) {
          const v = src[i]!;
          x[off + i] *= pw === 1 ? v : pw === 2 ? v * v : Math.pow(v, pw);
        }
      }
      col++;
    }
  } else {
    const rowBuf = new Float64Array(p);
    const values = valuesOf();
    for (let i = 0; i < n; i++) {
      model.row(values.subarray(i * k, (i + 1) * k), rowBuf);
      for (let j = 0; j < p; j++) x[j * n + i] = rowBuf[j]!;
    }
  }

  return assembleFrame({ factors, coding, intercept, terms, model, n, p, x, y: yAll.slice(0, n), factorColumns, rowIndex: () => rowIndex, excludedRows, pointMatrix: valuesOf });
}

function checkCoding(factors: readonly Factor[], coding: Coding): void {
  if (coding !== 'coded') return;
  for (const f of factors) {
    if (f.kind === 'continuous' && !(f.high > f.low)) {
      throw invalidInput('coding', `factor ${f.name} takes a single value (${f.low}) in the data, so it cannot be coded onto [-1, 1]`);
    }
  }
}

/** Low end and range of a numeric factor's coding onto [-1, 1]; null for natural units and categorical factors. */
function codingOf(f: Factor, coding: Coding): { low: number; range: number } | null {
  if (f.kind === 'categorical' || coding !== 'coded') return null;
  const { low, high } = f.kind === 'continuous' ? { low: f.low, high: f.high } : { low: Math.min(...f.values), high: Math.max(...f.values) };
  return { low, range: high - low };
}

/**
 * The common case built in one pass over the rows: every factor numeric, every cell of the factor
 * and response columns a finite number. Each row is read once; a factor that enters the model as a
 * main effect is read straight into its model-matrix column (which also serves as its factor
 * column), and product and power columns are then formed from those columns. Returns null when the
 * data need the general path (missing or text cells, categorical factors), which also words the errors.
 */
function numericFrame(request: AnalysisRequest, intercept: boolean, parsed: ModelTerm[], usedNames: string[]): ModelFrame | null {
  const { data, response } = request;
  const given = request.factors;
  const givenFactors = given ? usedNames.map((nm) => given.find((f) => f.name === nm)) : null;
  if (givenFactors && givenFactors.some((f) => !f || f.kind === 'categorical')) return null;
  const terms = intercept ? [INTERCEPT, ...parsed] : parsed;
  const n = data.length;
  const p = terms.length;
  const k = usedNames.length;
  const x = largeColumnArray(n * p);
  // A factor's column: the model-matrix column of its main effect, or a column of its own.
  const factorColumns = usedNames.map((name) => {
    const col = terms.findIndex((t) => t.parts.length === 1 && t.parts[0]!.name === name && t.parts[0]!.power === 1);
    return col >= 0 ? x.subarray(col * n, (col + 1) * n) : new Float64Array(n);
  });
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const row = data[i];
    if (row === null || typeof row !== 'object') return null;
    for (let j = 0; j < k; j++) {
      const v = row[usedNames[j]!];
      factorColumns[j]![i] = typeof v === 'number' ? v : NaN;
    }
    const v = row[response];
    y[i] = typeof v === 'number' ? v : NaN;
  }
  const lows = new Float64Array(k);
  const highs = new Float64Array(k);
  for (let j = 0; j <= k; j++) {
    const col = j < k ? factorColumns[j]! : y;
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = col[i]!;
      if (v !== v || v === Infinity || v === -Infinity) return null;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (j < k) {
      lows[j] = lo;
      highs[j] = hi;
    }
  }
  const factors: Factor[] = givenFactors
    ? (givenFactors as Factor[])
    : usedNames.map((name, j) => ({ name, kind: 'continuous', low: lows[j]!, high: highs[j]! }) as Factor);
  const coding: Coding = request.coding ?? (given ? 'coded' : 'natural');
  checkCoding(factors, coding);
  const model = compileModel(factors, terms);
  if (model.p !== p) return null;
  factors.forEach((f, j) => {
    const c = codingOf(f, coding);
    if (!c) return;
    const col = factorColumns[j]!;
    for (let i = 0; i < n; i++) col[i] = (2 * (col[i]! - c.low)) / c.range - 1;
  });
  // Columns that are not a factor's own: the intercept, products and powers.
  const factorIdx = new Map(usedNames.map((nm, j) => [nm, j]));
  terms.forEach((t, col) => {
    const off = col * n;
    if (t.parts.length === 1 && t.parts[0]!.power === 1) return;
    x.fill(1, off, off + n);
    for (const part of t.parts) {
      const src = factorColumns[factorIdx.get(part.name)!]!;
      const pw = part.power;
      for (let i = 0; i < n; i++) {
        const v = src[i]!;
        x[off + i] *= pw === 1 ? v : pw === 2 ? v * v : Math.pow(v, pw);
      }
    }
  });
  let rowIndex: number[] | undefined;
  let values: Float64Array | undefined;
  return assembleFrame({
    factors,
    coding,
    intercept,
    terms,
    model,
    n,
    p,
    x,
    y,
    factorColumns,
    rowIndex: () => (rowIndex ??= Array.from({ length: n }, (_, i) => i)),
    excludedRows: [],
    pointMatrix: () => {
      if (values) return values;
      values = new Float64Array(Math.max(1, n * k));
      for (let t = 0; t < n; t++) for (let j = 0; j < k; j++) values[t * k + j] = factorColumns[j]![t]!;
      return values;
    },
  });
}

interface FrameParts {
  factors: Factor[];
  coding: Coding;
  intercept: boolean;
  terms: ModelTerm[];
  model: CompiledModel;
  n: number;
  p: number;
  x: Float64Array;
  y: Float64Array;
  factorColumns: Float64Array[];
  rowIndex: () => number[];
  excludedRows: number[];
  pointMatrix: () => Float64Array;
}

/** The model frame from its parts: points, row indices and low-order parts are made on first use. */
function assembleFrame(parts: FrameParts): ModelFrame {
  const { factors, coding, intercept, terms, model, n, p, x, y, factorColumns, excludedRows } = parts;
  const k = factors.length;
  let pointViews: Float64Array[] | undefined;
  const pointsOf = () => (pointViews ??= Array.from({ length: n }, (_, i) => parts.pointMatrix().subarray(i * k, (i + 1) * k)));
  // Columns whose entries are products of two or more numeric values may be rounded.
  const factorIndex = new Map(factors.map((f, i) => [f.name, i]));
  const productTerms = new Set<number>();
  terms.forEach((t, ti) => {
    let multiplicity = 0;
    for (const part of t.parts) if (factors[factorIndex.get(part.name)!]!.kind !== 'categorical') multiplicity += part.power;
    if (multiplicity >= 2) productTerms.add(ti);
  });
  let low: Float64Array | null | undefined;
  const lowParts = (): Float64Array | null => {
    if (low !== undefined) return low;
    if (productTerms.size === 0) return (low = null);
    const out = new Float64Array(n * p);
    const vals: number[] = [];
    for (let j = 0; j < p; j++) {
      const ti = model.termOfColumn[j]!;
      if (!productTerms.has(ti)) continue;
      const term = terms[ti]!;
      for (let i = 0; i < n; i++) {
        const hi = x[j * n + i]!;
        if (hi === 0 || !Number.isFinite(hi)) continue;
        vals.length = 0;
        let sign = 1;
        for (const part of term.parts) {
          const fi = factorIndex.get(part.name)!;
          if (factors[fi]!.kind === 'categorical') continue;
          const v = factorColumns[fi]![i]!;
          if (v < 0 && part.power % 2 === 1) sign = -sign;
          for (let k = 0; k < part.power; k++) vals.push(v);
        }
        // hi = m · (rounded numeric product) with m = ±1 from categorical columns.
        const m = Math.sign(hi) === sign ? 1 : -1;
        out[j * n + i] = m * productRemainder(vals, m * hi);
      }
    }
    return (low = out);
  };
  return {
    factors,
    coding,
    intercept,
    terms,
    model,
    n,
    p,
    x,
    y,
    get points() {
      return pointsOf();
    },
    get pointMatrix() {
      return parts.pointMatrix();
    },
    factorColumns,
    get rowIndex() {
      return parts.rowIndex();
    },
    excludedRows,
    lowParts,
  };
}
