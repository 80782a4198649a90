/** Plackett–Burman two-level screening designs for N = 8, 12, 16, 20, 24 runs (cyclic constructions). */
// Plackett & Burman (1946), Biometrika 33:305-325
import { invalidInput } from '../errors';

/** First rows of the cyclic constructions, as printed with the method. */
export const PLACKETT_BURMAN_GENERATORS: Readonly<Record<number, string>> = {
  8: '+++-+--',
  12: '++-+++---+-',
  16: '++++-+-++--+---',
  20: '++--++++-+-+----++-',
  24: '+++++-+-++--++--+-+----',
};

export const PLACKETT_BURMAN_SIZES = [8, 12, 16, 20, 24] as const;

/**
 * The N × (N − 1) matrix of ±1: row i (i < N − 1) is the generator shifted right by i, so
 * X[i][j] = g[(j − i) mod (N − 1)]; the last row is all −1.
 */
export function plackettBurmanMatrix(n: number): number[][] {
  const g = PLACKETT_BURMAN_GENERATORS[n];
  if (!g) throw invalidInput('runs', `a Plackett–Burman design here has ${PLACKETT_BURMAN_SIZES.join(', ')} runs`);
  const m = n - 1;
  const signs = [...g].map((c) => (c === '+' ? 1 : -1));
  const rows: number[][] = [];
  for (let i = 0; i < m; i++) rows.push(Array.from({ length: m }, (_, j) => signs[(((j - i) % m) + m) % m]!));
  rows.push(new Array<number>(m).fill(-1));
  return rows;
}

/** Smallest Plackett–Burman size that screens k factors, or the size asked for. */
export function plackettBurmanSize(k: number, runs?: number): number {
  if (runs !== undefined) {
    if (!(PLACKETT_BURMAN_SIZES as readonly number[]).includes(runs)) {
      throw invalidInput('runs', `a Plackett–Burman design here has ${PLACKETT_BURMAN_SIZES.join(', ')} runs`);
    }
    if (runs - 1 < k) throw invalidInput('runs', `${runs} runs screen at most ${runs - 1} factors; you have ${k}`);
    return runs;
  }
  const n = PLACKETT_BURMAN_SIZES.find((s) => s - 1 >= k);
  if (!n) throw invalidInput('factors', `a Plackett–Burman design here screens at most 23 factors; you have ${k}`);
  return n;
}

/** The first k columns of the N-run design. */
export function plackettBurmanDesign(k: number, runs?: number): number[][] {
  const n = plackettBurmanSize(k, runs);
  return plackettBurmanMatrix(n).map((row) => row.slice(0, k));
}
