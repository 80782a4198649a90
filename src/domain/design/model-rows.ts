/**
 * Model rows for hot loops: each model-matrix column is a product of per-factor parts (a power of a
 * numeric factor, or one effect-code column of a categorical factor), evaluated without allocation,
 * and the columns that involve each factor are listed so a one-coordinate change recomputes only
 * those. Same columns, in the same order, as compileModel.
 */
import type { Factor, ModelTerm } from '../factors';
import { columnFactorParts } from './region';

export interface FastModel {
  p: number;
  /** Columns that involve factor j. */
  columnsOf: Int32Array[];
  row(coded: ArrayLike<number>, out: Float64Array): Float64Array;
  column(c: number, coded: ArrayLike<number>): number;
}

export function fastModel(factors: readonly Factor[], terms: readonly ModelTerm[]): FastModel {
  const columns = columnFactorParts(factors, terms);
  const p = columns.length;
  const starts = new Int32Array(p + 1);
  const parts = columns.reduce((n, c) => n + c.length, 0);
  const pj = new Int32Array(parts);
  const ppow = new Int32Array(parts);
  const pcat = new Int32Array(parts);
  const plev = new Int32Array(parts);
  let q = 0;
  columns.forEach((c, a) => {
    starts[a] = q;
    for (const part of c) {
      const f = factors[part.j]!;
      pj[q] = part.j;
      ppow[q] = part.power;
      pcat[q] = part.catColumn;
      plev[q] = f.kind === 'categorical' ? f.levels.length : 0;
      q++;
    }
  });
  starts[p] = q;
  const columnsOf = factors.map((_, j) => Int32Array.from(columns.map((c, a) => (c.some((part) => part.j === j) ? a : -1)).filter((a) => a >= 0)));
  const column = (a: number, x: ArrayLike<number>): number => {
    let v = 1;
    for (let t = starts[a]!; t < starts[a + 1]!; t++) {
      const xv = x[pj[t]!]!;
      if (plev[t]! > 0) {
        const lvl = Math.round(xv);
        v *= lvl === pcat[t]! ? 1 : lvl === plev[t]! - 1 ? -1 : 0;
      } else {
        const pw = ppow[t]!;
        v *= pw === 1 ? xv : pw === 2 ? xv * xv : Math.pow(xv, pw);
      }
    }
    return v;
  };
  return {
    p,
    columnsOf,
    column,
    row(x, out) {
      for (let a = 0; a < p; a++) out[a] = column(a, x);
      return out;
    },
  };
}
