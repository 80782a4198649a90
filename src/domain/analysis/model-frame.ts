/**
 * From request rows to a model matrix: factors (given or inferred), coding, the compiled model,
 * the response vector, and the low-order parts of product columns for accurate refinement.
 */
import { invalidInput } from '../errors';
import {
  INTERCEPT,
  codePoint,
  compileModel,
  levelIndex,
  parseTerm,
  type CompiledModel,
  type Factor,
  type ModelTerm,
} from '../factors';
import { productRemainder } from './compensated';
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
  points: Float64Array[];
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

/** Factors for the names used in the terms, inferred from the data: numeric columns are continuous, others categorical. */
export function inferFactors(data: readonly DataRow[], names: readonly string[]): Factor[] {
  return names.map((name) => {
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
      const num = asNumber(v);
      if (Number.isFinite(num)) {
        low = Math.min(low, num);
        high = Math.max(high, num);
      } else {
        numeric = false;
      }
      const label = String(v);
      if (!levelSet.has(label)) {
        levelSet.add(label);
        levels.push(label);
      }
    }
    if (!seen) throw invalidInput('terms', `term names "${name}", but no row of data has a value in column "${name}"`);
    if (numeric) return { name, kind: 'continuous', low, high } as Factor;
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
  const factors: Factor[] = given ? usedNames.map((nm) => given.find((f) => f.name === nm)!) : inferFactors(data, usedNames);
  const coding: Coding = request.coding ?? (given ? 'coded' : 'natural');
  if (coding === 'coded') {
    for (const f of factors) {
      if (f.kind === 'continuous' && !(f.high > f.low)) {
        throw invalidInput('coding', `factor ${f.name} takes a single value (${f.low}) in the data, so it cannot be coded onto [-1, 1]`);
      }
    }
  }
  const terms = intercept ? [INTERCEPT, ...parsed] : parsed;
  const model = compileModel(factors, terms);
  const p = model.p;

  const rowIndex: number[] = [];
  const excludedRows: number[] = [];
  const yList: number[] = [];
  const points: Float64Array[] = [];
  data.forEach((row, i) => {
    if (row === null || typeof row !== 'object') throw invalidInput(`data[${i}]`, `data[${i}] must be an object of column values`);
    const rv = row[response];
    if (isMissing(rv)) {
      excludedRows.push(i);
      return;
    }
    const yv = asNumber(rv);
    if (!Number.isFinite(yv)) throw invalidInput(`data[${i}].${response}`, `response ${response} in row ${i} must be a finite number, got "${String(rv)}"`);
    let pt: number[];
    try {
      if (coding === 'coded') {
        pt = codePoint(factors, row as Record<string, number | string>);
      } else {
        pt = factors.map((f) => {
          const v = row[f.name];
          if (isMissing(v)) throw invalidInput(f.name, `missing value for ${f.name}`);
          if (f.kind === 'categorical') return levelIndex(f, v as string | number);
          const num = asNumber(v);
          if (!Number.isFinite(num)) throw invalidInput(f.name, `${f.name} must be a finite number, got "${String(v)}"`);
          return num;
        });
      }
    } catch (e) {
      const msg = e instanceof Error ? e.message : String(e);
      const field = (e as { field?: string }).field ?? '?';
      throw invalidInput(`data[${i}].${field}`, `row ${i}: ${msg}`);
    }
    rowIndex.push(i);
    yList.push(yv);
    points.push(Float64Array.from(pt));
  });
  const n = rowIndex.length;
  if (n === 0) throw invalidInput('data', `no row has a value for the response "${response}"`);
  const x = new Float64Array(n * p);
  const rowBuf = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    model.row(points[i]!, rowBuf);
    for (let j = 0; j < p; j++) x[j * n + i] = rowBuf[j]!;
  }

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
          const v = points[i]![fi]!;
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
  return { factors, coding, intercept, terms, model, n, p, x, y: Float64Array.from(yList), points, rowIndex, excludedRows, lowParts };
}
