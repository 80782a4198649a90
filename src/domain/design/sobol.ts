/**
 * Sobol points in [0, 1)^d in Gray-code order, optionally scrambled by a random linear matrix
 * scramble and a random digital shift, which keep the net structure (same seed, same points).
 */
// Sobol (1967), USSR Comput. Math. Math. Phys. 7:86-112; direction numbers of Joe & Kuo (2008), SIAM J. Sci. Comput. 30:2635-2654
// Matoušek (1998), J. Complexity 14:527-556 (linear matrix scrambling with a digital shift)
import { invalidInput } from '../errors';
import type { RandomSource } from '../random';

const BITS = 30;

/**
 * Primitive polynomials (degree s, coefficients a) and initial direction numbers m for dimensions
 * 2..16, as in the Joe & Kuo (2008) table; dimension 1 is the van der Corput sequence.
 */
const DIRECTION_TABLE: readonly { s: number; a: number; m: readonly number[] }[] = [
  { s: 1, a: 0, m: [1] },
  { s: 2, a: 1, m: [1, 3] },
  { s: 3, a: 1, m: [1, 3, 1] },
  { s: 3, a: 2, m: [1, 1, 1] },
  { s: 4, a: 1, m: [1, 1, 3, 3] },
  { s: 4, a: 4, m: [1, 3, 5, 13] },
  { s: 5, a: 2, m: [1, 1, 5, 5, 17] },
  { s: 5, a: 4, m: [1, 1, 5, 5, 5] },
  { s: 5, a: 7, m: [1, 1, 7, 11, 19] },
  { s: 5, a: 11, m: [1, 1, 5, 1, 1] },
  { s: 5, a: 13, m: [1, 1, 1, 3, 11] },
  { s: 5, a: 14, m: [1, 3, 5, 5, 31] },
  { s: 6, a: 1, m: [1, 3, 3, 9, 7, 49] },
  { s: 6, a: 13, m: [1, 1, 1, 15, 21, 21] },
  { s: 6, a: 16, m: [1, 3, 1, 13, 27, 49] },
];

export const SOBOL_MAX_DIMENSIONS = DIRECTION_TABLE.length + 1;

/** Direction numbers v[k] (k = 0..BITS−1) of one dimension, as BITS-bit integers. */
function directionNumbers(dim: number): Uint32Array {
  const v = new Uint32Array(BITS);
  if (dim === 0) {
    for (let k = 0; k < BITS; k++) v[k] = 1 << (BITS - 1 - k);
    return v;
  }
  const { s, a, m } = DIRECTION_TABLE[dim - 1]!;
  for (let k = 0; k < Math.min(s, BITS); k++) v[k] = m[k]! << (BITS - 1 - k);
  for (let k = s; k < BITS; k++) {
    let x = v[k - s]! ^ (v[k - s]! >>> s);
    for (let t = 1; t < s; t++) if ((a >>> (s - 1 - t)) & 1) x ^= v[k - t]!;
    v[k] = x;
  }
  return v;
}

/**
 * Linear matrix scramble: v ← L v with L a random lower-triangular bit matrix with unit diagonal,
 * applied to the digits of each direction number (most significant first).
 */
function scrambleDirections(v: Uint32Array, rng: RandomSource): Uint32Array {
  const rows: number[] = [];
  for (let r = 0; r < BITS; r++) {
    // Row r of L: bit r (diagonal) set, random bits for columns 0..r−1 (more significant digits).
    let row = 1 << (BITS - 1 - r);
    for (let c = 0; c < r; c++) if (rng.next() < 0.5) row |= 1 << (BITS - 1 - c);
    rows.push(row);
  }
  const out = new Uint32Array(BITS);
  for (let k = 0; k < BITS; k++) {
    let y = 0;
    for (let r = 0; r < BITS; r++) {
      let parity = rows[r]! & v[k]!;
      parity ^= parity >>> 16;
      parity ^= parity >>> 8;
      parity ^= parity >>> 4;
      parity ^= parity >>> 2;
      parity ^= parity >>> 1;
      if (parity & 1) y |= 1 << (BITS - 1 - r);
    }
    out[k] = y >>> 0;
  }
  return out;
}

/** The first n Sobol points in d dimensions; scrambled when `rng` is given. */
export function sobolPoints(n: number, d: number, rng?: RandomSource): number[][] {
  if (!Number.isInteger(d) || d < 1 || d > SOBOL_MAX_DIMENSIONS) {
    throw invalidInput('factors', `Sobol points here take 1 to ${SOBOL_MAX_DIMENSIONS} factors`);
  }
  if (!Number.isInteger(n) || n < 1 || n > 2 ** 20) throw invalidInput('runs', 'runs must be a whole number from 1 to 1048576');
  const dirs: Uint32Array[] = [];
  const shift = new Uint32Array(d);
  for (let j = 0; j < d; j++) {
    const v = directionNumbers(j);
    dirs.push(rng ? scrambleDirections(v, rng) : v);
    if (rng) shift[j] = Math.floor(rng.next() * 2 ** BITS) >>> 0;
  }
  const x = new Uint32Array(d);
  for (let j = 0; j < d; j++) x[j] = shift[j]!;
  const out: number[][] = [];
  const scale = 2 ** -BITS;
  for (let i = 0; i < n; i++) {
    out.push(Array.from(x, (v) => v * scale));
    // Gray-code order: flip the direction number of the lowest zero bit of i.
    let c = 0;
    while ((i >>> c) & 1) c++;
    for (let j = 0; j < d; j++) x[j] = (x[j]! ^ dirs[j]![c]!) >>> 0;
  }
  return out;
}
