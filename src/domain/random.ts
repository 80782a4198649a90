/**
 * Seeded pseudo-random numbers. Domain code never calls Math.random(): randomness comes in as a
 * generator built from a seed, so the same seed gives the same design, byte for byte.
 */

/** A source of uniform numbers in [0, 1). */
export interface RandomSource {
  next(): number;
}

// Mulberry32: a small 32-bit generator with good statistical quality for simulation use
// (common practice, no source beyond its public-domain reference implementation).
export function seededRandom(seed: number): RandomSource {
  let state = (Math.floor(seed) ^ 0x9e3779b9) >>> 0;
  return {
    next() {
      state = (state + 0x6d2b79f5) >>> 0;
      let t = state;
      t = Math.imul(t ^ (t >>> 15), t | 1);
      t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
      return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
    },
  };
}

/** Integer in [0, n). */
export function randomInt(rng: RandomSource, n: number): number {
  return Math.floor(rng.next() * n);
}

/** Standard normal deviate by the Box–Muller transform (Box & Muller 1958). */
export function randomNormal(rng: RandomSource): number {
  let u = 0;
  while (u === 0) u = rng.next();
  const v = rng.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** Fisher–Yates shuffle (Durstenfeld 1964), returning a new array. */
export function shuffled<T>(items: readonly T[], rng: RandomSource): T[] {
  const a = items.slice();
  for (let i = a.length - 1; i > 0; i--) {
    const j = randomInt(rng, i + 1);
    const tmp = a[i]!;
    a[i] = a[j]!;
    a[j] = tmp;
  }
  return a;
}
