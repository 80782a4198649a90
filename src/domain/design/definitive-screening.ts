/**
 * Definitive screening designs: D = [C; −C; 0] from a conference matrix C (zero diagonal, ±1
 * elsewhere, C'C = (n − 1) I), so main effects are orthogonal to each other and to every two-factor
 * interaction and quadratic column. Odd factor counts drop a column of the next even order; more runs
 * come from a larger conference matrix with its extra columns dropped.
 */
// Jones & Nachtsheim (2011), J. Quality Technology 43:1-15; Xiao, Lin & Bai (2012), J. Quality Technology 44:2-8
import { DomainError, invalidInput } from '../errors';
import type { Factor } from '../factors';
import type { CodedRun } from './types';

/** Orders with a Paley conference matrix here: q = order − 1 a prime, or 9 (GF(9)). */
export const CONFERENCE_ORDERS = [4, 6, 8, 10, 12, 14, 18, 20, 24, 30, 32] as const;

function isPrime(q: number): boolean {
  if (q < 2) return false;
  for (let d = 2; d * d <= q; d++) if (q % d === 0) return false;
  return true;
}

/**
 * Quadratic character table of GF(q) (q an odd prime or 9) and its subtraction, elements numbered
 * 0..q−1. GF(9) = GF(3)[i] with i² = −1, element a + b i numbered a + 3b.
 */
function finiteField(q: number): { sub: (x: number, y: number) => number; chi: Int8Array } {
  let mul: (x: number, y: number) => number;
  let sub: (x: number, y: number) => number;
  if (isPrime(q)) {
    mul = (x, y) => (x * y) % q;
    sub = (x, y) => (((x - y) % q) + q) % q;
  } else if (q === 9) {
    const parts = (x: number) => [x % 3, Math.floor(x / 3)] as const;
    const make = (a: number, b: number) => (((a % 3) + 3) % 3) + 3 * (((b % 3) + 3) % 3);
    mul = (x, y) => {
      const [a, b] = parts(x);
      const [c, d] = parts(y);
      return make(a * c - b * d, a * d + b * c);
    };
    sub = (x, y) => {
      const [a, b] = parts(x);
      const [c, d] = parts(y);
      return make(a - c, b - d);
    };
  } else {
    throw invalidInput('factors', `no conference matrix of order ${q + 1} is built here`);
  }
  const chi = new Int8Array(q).fill(-1);
  chi[0] = 0;
  for (let x = 1; x < q; x++) chi[mul(x, x)] = 1;
  return { sub, chi };
}

/** Paley conference matrix of order n = q + 1 (Paley 1933): [[0, 1'], [±1, Q]], Q_ij = χ(j − i). */
// Paley (1933), J. Math. Phys. 12:311-320
export function conferenceMatrix(order: number): number[][] {
  const q = order - 1;
  const { sub, chi } = finiteField(q);
  const sign = q % 4 === 1 ? 1 : -1;
  const c: number[][] = [[0, ...new Array<number>(q).fill(1)]];
  for (let i = 0; i < q; i++) c.push([sign, ...Array.from({ length: q }, (_, j) => chi[sub(j, i)]!)]);
  return c;
}

export interface DefinitiveScreeningOptions {
  /** Ask for at least this many runs; a larger conference matrix is used and its extra columns dropped. */
  runs?: number;
}

/**
 * Coded runs: continuous factors at −1/0/+1; two-level categorical factors (Jones & Nachtsheim 2013)
 * take ±1 where the conference matrix has its zero, and the centre run is split into two runs that
 * differ only in the categorical factors.
 */
// Jones & Nachtsheim (2013), J. Quality Technology 45:121-129 (added two-level categorical factors)
export function definitiveScreeningDesign(factors: readonly Factor[], options: DefinitiveScreeningOptions = {}): CodedRun[] {
  const m = factors.length;
  if (m < 3) throw invalidInput('factors', 'a definitive screening design needs at least three factors');
  const categorical = factors.map((f, i) => {
    if (f.kind === 'categorical' && f.levels.length !== 2) {
      throw new DomainError('unsupported', `a definitive screening design takes two-level categorical factors; ${f.name} has ${f.levels.length}`, `factors[${i}].levels`);
    }
    if (f.kind === 'discrete' && f.values.length !== 3) {
      throw new DomainError('unsupported', `a definitive screening design takes discrete factors with three values; ${f.name} has ${f.values.length}`, `factors[${i}].values`);
    }
    return f.kind === 'categorical';
  });
  const hasCategorical = categorical.some(Boolean);
  const extraRuns = hasCategorical ? 2 : 1;
  const order = CONFERENCE_ORDERS.find((n) => n >= m && 2 * n + extraRuns >= (options.runs ?? 0));
  if (!order) throw invalidInput(options.runs ? 'runs' : 'factors', 'a definitive screening design here takes up to 32 factors and 65 runs');
  const c = conferenceMatrix(order).map((row) => row.slice(0, m));
  const rows: number[][] = [];
  for (const sign of [1, -1]) {
    c.forEach((row, r) => rows.push(row.map((v, j) => (categorical[j] && v === 0 && r === j ? sign : sign * v))));
  }
  if (hasCategorical) {
    rows.push(categorical.map((cat) => (cat ? 1 : 0)));
    rows.push(categorical.map((cat) => (cat ? -1 : 0)));
  } else {
    rows.push(new Array<number>(m).fill(0));
  }
  // Categorical factors are coded by level index: −1 → first level, +1 → second.
  return rows.map((row) => ({ coded: row.map((v, j) => (categorical[j] ? (v < 0 ? 0 : 1) : v)) }));
}
