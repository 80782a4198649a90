/**
 * Model terms and model matrices, shared by design construction, diagnostics, analysis and the
 * next-trial strategies. A term is a product of factor powers: "x1", "x1*x2", "x1^2", "x^10".
 * The intercept is the empty product. A categorical factor's name stands for its effect-coded
 * (sum-to-zero) columns, one fewer than its levels.
 */
import { invalidInput } from '../errors';
import type { Factor } from './types';

export interface TermPart {
  name: string;
  power: number;
}

export interface ModelTerm {
  /** Canonical label, e.g. "(Intercept)", "payload", "payload*gain", "gain^2". */
  label: string;
  parts: TermPart[];
}

export type StandardModel = 'main-effects' | 'interactions' | 'quadratic';

export const INTERCEPT: ModelTerm = { label: '(Intercept)', parts: [] };

function labelOf(parts: TermPart[]): string {
  if (parts.length === 0) return INTERCEPT.label;
  return parts.map((p) => (p.power === 1 ? p.name : `${p.name}^${p.power}`)).join('*');
}

/** Parse "a*b", "a^2", "a:b" into a term; factor names are checked against `factors` when given. */
export function parseTerm(text: string, factors?: readonly Factor[], field = 'terms'): ModelTerm {
  const t = text.trim();
  if (t === '1' || t === '(Intercept)') return INTERCEPT;
  const byName = factors ? new Map(factors.map((f) => [f.name, f])) : undefined;
  const powers = new Map<string, number>();
  for (const raw of t.split(/[*:]/)) {
    const piece = raw.trim();
    const m = /^([A-Za-z][A-Za-z0-9_]*)(?:\^(\d+))?$/.exec(piece);
    if (!m) {
      throw invalidInput(field, `cannot read term "${text}": write names joined by * with optional ^power, e.g. "x1*x2" or "x1^2"`);
    }
    const name = m[1]!;
    const power = m[2] ? Number(m[2]) : 1;
    if (power < 1 || power > 12) throw invalidInput(field, `power in "${text}" must be between 1 and 12`);
    if (byName && !byName.has(name)) {
      throw invalidInput(field, `term "${text}" names "${name}", which is not a factor; known: ${[...byName.keys()].join(', ')}`);
    }
    const f = byName?.get(name);
    if (f?.kind === 'categorical' && power > 1) {
      throw invalidInput(field, `term "${text}" raises categorical factor ${name} to a power; categorical factors enter only as themselves`);
    }
    powers.set(name, (powers.get(name) ?? 0) + power);
  }
  const parts = [...powers.entries()].map(([name, power]) => ({ name, power }));
  return { label: labelOf(parts), parts };
}

/** Intercept, main effects, and optionally two-factor interactions and pure quadratics. */
export function standardTerms(factors: readonly Factor[], model: StandardModel): ModelTerm[] {
  const terms: ModelTerm[] = [INTERCEPT];
  for (const f of factors) terms.push({ label: f.name, parts: [{ name: f.name, power: 1 }] });
  if (model === 'interactions' || model === 'quadratic') {
    for (let i = 0; i < factors.length; i++) {
      for (let j = i + 1; j < factors.length; j++) {
        const parts = [
          { name: factors[i]!.name, power: 1 },
          { name: factors[j]!.name, power: 1 },
        ];
        terms.push({ label: labelOf(parts), parts });
      }
    }
  }
  if (model === 'quadratic') {
    for (const f of factors) {
      const levels = f.kind === 'discrete' ? f.values.length : f.kind === 'continuous' ? Infinity : 0;
      if (levels >= 3) {
        const parts = [{ name: f.name, power: 2 }];
        terms.push({ label: labelOf(parts), parts });
      }
    }
  }
  return terms;
}

/** Column labels of the model matrix for the given terms. */
export function columnLabels(factors: readonly Factor[], terms: readonly ModelTerm[]): { labels: string[]; termOfColumn: number[] } {
  const byName = new Map(factors.map((f) => [f.name, f]));
  const labels: string[] = [];
  const termOfColumn: number[] = [];
  terms.forEach((term, ti) => {
    let combos: string[][] = [[]];
    for (const part of term.parts) {
      const f = byName.get(part.name);
      if (!f) throw invalidInput('terms', `term "${term.label}" names unknown factor "${part.name}"`);
      const pieces: string[] =
        f.kind === 'categorical'
          ? f.levels.slice(0, -1).map((lv) => `${f.name}[${lv}]`)
          : [part.power === 1 ? f.name : `${f.name}^${part.power}`];
      const next: string[][] = [];
      for (const c of combos) for (const p of pieces) next.push([...c, p]);
      combos = next;
    }
    for (const c of combos) {
      labels.push(c.length === 0 ? INTERCEPT.label : c.join('*'));
      termOfColumn.push(ti);
    }
  });
  return { labels, termOfColumn };
}

/**
 * A compiled model: turns a coded point (as from codePoint: numeric factors in coded units,
 * categorical factors as level index) into a model-matrix row, fast enough for exchange loops.
 */
export interface CompiledModel {
  terms: ModelTerm[];
  labels: string[];
  termOfColumn: number[];
  p: number;
  /** Write the model row of `coded` into `out` (length p) and return it. */
  row(coded: ArrayLike<number>, out?: Float64Array): Float64Array;
}

export function compileModel(factors: readonly Factor[], terms: readonly ModelTerm[]): CompiledModel {
  const index = new Map(factors.map((f, i) => [f.name, i]));
  const { labels, termOfColumn } = columnLabels(factors, terms);
  const p = labels.length;
  // Each term: list of (factor index, power, categorical level count or 0).
  const plan = terms.map((t) =>
    t.parts.map((part) => {
      const fi = index.get(part.name)!;
      const f = factors[fi]!;
      return { fi, power: part.power, cat: f.kind === 'categorical' ? f.levels.length : 0 };
    }),
  );
  const scratchA: number[] = [];
  const scratchB: number[] = [];
  return {
    terms: terms.slice(),
    labels,
    termOfColumn,
    p,
    row(coded, out = new Float64Array(p)) {
      let col = 0;
      for (const parts of plan) {
        let cur = scratchA;
        cur.length = 1;
        cur[0] = 1;
        for (const { fi, power, cat } of parts) {
          const v = coded[fi]!;
          const next = cur === scratchA ? scratchB : scratchA;
          next.length = 0;
          if (cat > 0) {
            const lvl = Math.round(v);
            for (const c of cur) {
              for (let j = 0; j < cat - 1; j++) next.push(c * (lvl === j ? 1 : lvl === cat - 1 ? -1 : 0));
            }
          } else {
            const pv = power === 1 ? v : power === 2 ? v * v : Math.pow(v, power);
            for (const c of cur) next.push(c * pv);
          }
          cur = next;
        }
        for (const c of cur) out[col++] = c;
      }
      return out;
    },
  };
}

/** Model matrix (n × p, row-major) for coded points. */
export function modelMatrix(model: CompiledModel, codedPoints: readonly ArrayLike<number>[]): { data: Float64Array; n: number; p: number } {
  const n = codedPoints.length;
  const data = new Float64Array(n * model.p);
  const row = new Float64Array(model.p);
  codedPoints.forEach((pt, i) => {
    model.row(pt, row);
    data.set(row, i * model.p);
  });
  return { data, n, p: model.p };
}
