/**
 * Blocking of factorial designs by confounding: blocks are the level combinations of a few chosen
 * interactions (the block generators), so every block is a fraction of the design and the effects
 * confounded with blocks are the generators and their generalised interactions. Two-level designs
 * (full factorials, fractions and the cube of a composite design) and full factorials whose factors
 * share a prime number of levels s (blocks = s^q) are blocked this way.
 */
// Yates (1937), The Design and Analysis of Factorial Experiments (confounding with blocks); Sun, Wu & Chen (1997), Technometrics 39:298-307 (choice of block generators)
import { DomainError } from '../errors';
import { definingWords, popcount, type Generator } from './fractional-factorial';

/** An effect over the blocking columns: one coefficient in 0..s−1 per column (first non-zero one is 1). */
export type EffectVector = number[];

export interface BlockingProblem {
  /** Number of levels of each blocking column (a prime: 2, 3, 5, 7). */
  s: number;
  /** Number of blocking columns (the base factors of a two-level fraction). */
  m: number;
  /** Blocks = s^q. */
  q: number;
  /**
   * Lengths of the factor words an effect over the columns stands for: its support in a full
   * factorial, or the lengths of every word of its alias set in a two-level fraction.
   */
  wordLengths(v: EffectVector): number[];
  /** Longest word length counted in the comparison of two choices (the number of factors). */
  maxLength: number;
  /** Nodes the search may visit (default 200 000); it keeps the best choice found. */
  budget?: number;
}

export interface BlockingChoice {
  /** q independent block generators. */
  generators: EffectVector[];
  /** The (s^q − 1)/(s − 1) effects confounded with blocks, generators first. */
  confounded: EffectVector[];
  /** counts[L] = number of factor words of length L confounded with blocks (L = 0..maxLength). */
  counts: number[];
}

const PRIMES = [2, 3, 5, 7];

export function isPrime(s: number): boolean {
  return PRIMES.includes(s);
}

/** q with s^q = blocks, or null when blocks is not a power of s (blocks > 1). */
export function powerOf(blocks: number, s: number): number | null {
  let q = 0;
  let b = blocks;
  while (b > 1 && b % s === 0) {
    b /= s;
    q++;
  }
  return b === 1 && q > 0 ? q : null;
}

function addScaled(a: readonly number[], b: readonly number[], c: number, s: number): number[] {
  return a.map((x, j) => (x + c * b[j]!) % s);
}

function key(v: readonly number[], s: number): number {
  let k = 0;
  for (let j = v.length - 1; j >= 0; j--) k = k * s + v[j]!;
  return k;
}

/** Scale a non-zero vector so its first non-zero coefficient is 1. */
export function normalise(v: readonly number[], s: number): number[] {
  const first = v.find((x) => x !== 0);
  if (!first) return v.slice();
  let inv = 1;
  while ((first * inv) % s !== 1) inv++;
  return v.map((x) => (x * inv) % s);
}

function compareCounts(a: readonly number[], b: readonly number[]): number {
  for (let i = 0; i < Math.max(a.length, b.length); i++) {
    const d = (a[i] ?? 0) - (b[i] ?? 0);
    if (d !== 0) return d;
  }
  return 0;
}

/** All normalised non-zero effect vectors over m columns with s levels. */
function candidates(s: number, m: number): number[][] {
  const out: number[][] = [];
  const total = s ** m;
  for (let code = 1; code < total; code++) {
    const v: number[] = [];
    let rest = code;
    for (let j = 0; j < m; j++) {
      v.push(rest % s);
      rest = Math.floor(rest / s);
    }
    if (v.find((x) => x !== 0) === 1) out.push(v);
  }
  return out;
}

/**
 * Block generators with the least confounding: a depth-first search over sets of q independent
 * effects that compares, in order, the number of confounded words of length 1 (main effects), 2
 * (two-factor interactions), 3 and so on, and keeps the smallest (the blocking analogue of minimum
 * aberration). Candidates of high order come first, so good choices are met early; the search is
 * exhaustive for the usual sizes and keeps the best found within its budget otherwise.
 */
export function chooseBlockGenerators(problem: BlockingProblem): BlockingChoice | null {
  const { s, m, q, maxLength } = problem;
  if (q < 1 || q > m) return null;
  const budget = problem.budget ?? 200_000;
  const cands = candidates(s, m).map((v) => {
    const lengths = problem.wordLengths(v);
    return { v, lengths, shortest: Math.min(...lengths) };
  });
  cands.sort((a, b) => b.shortest - a.shortest || key(a.v, s) - key(b.v, s));
  const countsOf = (lengths: readonly number[], into: number[]) => {
    for (const l of lengths) into[Math.min(l, maxLength)]!++;
  };
  let best: BlockingChoice | null = null;
  let nodes = 0;
  const chosen: number[][] = [];
  const confounded: number[][] = [];
  const recurse = (start: number, span: number[][], spanKeys: Set<number>, counts: number[]) => {
    if (chosen.length === q) {
      if (!best || compareCounts(counts, best.counts) < 0) {
        best = { generators: chosen.map((v) => v.slice()), confounded: confounded.map((v) => v.slice()), counts: counts.slice() };
      }
      return;
    }
    for (let c = start; c < cands.length; c++) {
      if (nodes++ > budget) return;
      const g = cands[c]!.v;
      if (spanKeys.has(key(g, s))) continue;
      // New confounded effects: g + u for every u of the span so far (u = 0 included).
      const added = span.map((u) => normalise(addScaled(u, g, 1, s), s));
      const next = counts.slice();
      for (const v of added) countsOf(problem.wordLengths(v), next);
      if (best && compareCounts(next, (best as BlockingChoice).counts) >= 0) continue;
      const nextSpan: number[][] = [];
      for (const u of span) for (let a = 0; a < s; a++) nextSpan.push(addScaled(u, g, a, s));
      chosen.push(g);
      confounded.push(...added);
      recurse(c + 1, nextSpan, new Set(nextSpan.map((v) => key(v, s))), next);
      chosen.pop();
      confounded.length -= added.length;
    }
  };
  const zero = new Array<number>(m).fill(0);
  recurse(0, [zero], new Set([key(zero, s)]), new Array<number>(maxLength + 1).fill(0));
  return best;
}

/** Block (1-based) of a run from its level indices on the blocking columns: the generators' values mod s. */
export function blockOfLevels(levels: readonly number[], generators: readonly EffectVector[], s: number): number {
  let block = 0;
  for (let i = generators.length - 1; i >= 0; i--) {
    let v = 0;
    generators[i]!.forEach((c, j) => (v += c * levels[j]!));
    block = block * s + (((v % s) + s) % s);
  }
  return block + 1;
}

/** "A*B*C" for a two-level effect; "A*B^2*C" when coefficients exceed 1 (s > 2). */
export function effectLabel(v: readonly number[], names: readonly string[]): string {
  const parts: string[] = [];
  v.forEach((c, j) => {
    if (c === 1) parts.push(names[j]!);
    else if (c > 1) parts.push(`${names[j]}^${c}`);
  });
  return parts.join('*');
}

/** Refuse a blocking that confounds a main effect, or a term of the model, with blocks. */
export function assertUsableBlocking(
  choice: BlockingChoice | null,
  blocks: number,
  runs: number,
  protectedLength: number,
  confoundedLabels: () => string[],
  hint = 'ask for fewer blocks, or use the main-effects model',
): asserts choice is BlockingChoice {
  if (!choice || (choice.counts[1] ?? 0) > 0) {
    throw new DomainError(
      'unsupported',
      `${blocks} blocks of this ${runs}-run design would confound a main effect with blocks; ask for fewer blocks or more runs`,
      'blocks',
    );
  }
  if (protectedLength >= 2 && (choice.counts[2] ?? 0) > 0) {
    const two = confoundedLabels().filter((l) => l.split('*').length === 2);
    throw new DomainError(
      'unsupported',
      `${blocks} blocks of this ${runs}-run design confound the two-factor interaction${two.length > 1 ? 's' : ''} ${two.join(', ')} with blocks; ${hint}`,
      'blocks',
      { confounded: two },
    );
  }
}

/** Effects confounded with blocks, each with the other words of its alias set (two-level fractions). */
export interface ConfoundedEffect {
  effect: string;
  aliases: string[];
}

export interface FactorialBlocking {
  blocks: number;
  /** Block generators, named by factor (e.g. "speed*payload*gain"). */
  generators: string[];
  confounded: ConfoundedEffect[];
  /** Block (1..blocks) of a run of the unblocked design, from its coded values. */
  blockOf(coded: readonly number[]): number;
}

function wordName(mask: number, names: readonly string[]): string {
  const parts: string[] = [];
  names.forEach((n, j) => {
    if ((mask >> j) & 1) parts.push(n);
  });
  return parts.join('*');
}

/**
 * Blocks of a two-level design of k factors, full (no generators) or a fraction: the blocking
 * columns are the base factors, a block effect is a product of them and stands for its whole alias
 * set. `protectedLength` is 1 when only main effects must stay clear of blocks, 2 when two-factor
 * interactions must too. Coded runs are ±1 in every factor.
 */
export function blockTwoLevel(
  k: number,
  fraction: readonly Generator[],
  blocks: number,
  protectedLength: number,
  names: readonly string[],
  hint?: string,
): FactorialBlocking {
  const q = powerOf(blocks, 2);
  const runs = 2 ** (k - fraction.length);
  if (q === null) throw new DomainError('unsupported', `blocks of a two-level design are a power of two (2, 4, 8 …) up to ${runs / 2}; got ${blocks}`, 'blocks');
  const generated = new Set(fraction.map((g) => g.target));
  const base = [...Array(k).keys()].filter((j) => !generated.has(j));
  if (q > base.length - 1) {
    throw new DomainError('unsupported', `this ${runs}-run design takes at most ${runs / 2} blocks (of two runs each); got ${blocks}`, 'blocks');
  }
  const words = definingWords(fraction).map((w) => w.mask);
  const maskOf = (v: EffectVector) => v.reduce((m, c, j) => (c ? m | (1 << base[j]!) : m), 0);
  const aliasSet = (mask: number) => [mask, ...words.map((w) => w ^ mask)].sort((a, b) => popcount(a) - popcount(b) || a - b);
  const choice = chooseBlockGenerators({
    s: 2,
    m: base.length,
    q,
    maxLength: k,
    wordLengths: (v) => aliasSet(maskOf(v)).map(popcount),
  });
  const confounded = () =>
    (choice?.confounded ?? []).map((v) => {
      const [effect, ...aliases] = aliasSet(maskOf(v)).map((m) => wordName(m, names));
      return { effect: effect!, aliases };
    });
  assertUsableBlocking(choice, blocks, runs, protectedLength, () => confounded().flatMap((c) => [c.effect, ...c.aliases]), hint);
  return {
    blocks,
    generators: choice.generators.map((v) => wordName(maskOf(v), names)),
    confounded: confounded(),
    blockOf: (coded) => blockOfLevels(base.map((j) => (coded[j]! > 0 ? 0 : 1)), choice.generators, 2),
  };
}

/**
 * Blocks of a full factorial with mixed levels: blocks = s^q for a prime s, confounding
 * interactions of the factors that have exactly s levels (the others are crossed in every block).
 * `levelLists` are the coded levels of each factor in the design.
 */
export function blockFullFactorial(
  levelLists: readonly (readonly number[])[],
  blocks: number,
  protectedLength: number,
  names: readonly string[],
): FactorialBlocking {
  const runs = levelLists.reduce((a, l) => a * l.length, 1);
  const options: string[] = [];
  let pick: { s: number; q: number; columns: number[] } | null = null;
  for (const s of PRIMES) {
    const columns = levelLists.map((l, j) => (l.length === s ? j : -1)).filter((j) => j >= 0);
    if (columns.length < 2) continue;
    options.push(Array.from({ length: columns.length - 1 }, (_, i) => s ** (i + 1)).join(', ') + ` (from the ${columns.length} factors at ${s} levels)`);
    const q = powerOf(blocks, s);
    if (q !== null && q <= columns.length - 1 && !pick) pick = { s, q, columns };
  }
  if (!pick) {
    throw new DomainError(
      'unsupported',
      options.length
        ? `blocks of this full factorial can be ${options.join('; or ')}; got ${blocks}`
        : 'this full factorial cannot be blocked by confounding: it needs two or more factors with the same prime number of levels (2, 3, 5 or 7); use an optimal design with blocks',
      'blocks',
    );
  }
  const { s, q, columns } = pick;
  const colNames = columns.map((j) => names[j]!);
  const choice = chooseBlockGenerators({ s, m: columns.length, q, maxLength: levelLists.length, wordLengths: (v) => [v.filter((c) => c !== 0).length] });
  const labels = () => (choice?.confounded ?? []).map((v) => effectLabel(v, colNames));
  assertUsableBlocking(choice, blocks, runs, protectedLength, labels);
  return {
    blocks,
    generators: choice.generators.map((v) => effectLabel(v, colNames)),
    confounded: labels().map((effect) => ({ effect, aliases: [] })),
    blockOf: (coded) => blockOfLevels(columns.map((j) => levelLists[j]!.indexOf(coded[j]!)), choice.generators, s),
  };
}
