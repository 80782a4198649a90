/**
 * Blocking of factorial designs by confounding: blocks are the level combinations of a few chosen
 * interactions (the block generators), so every block is a fraction of the design and the effects
 * confounded with blocks are the generators and their generalised interactions. Two-level designs
 * (full factorials, fractions and the cube of a composite design) and full factorials whose factors
 * share a prime number of levels s (blocks = s^q) are blocked this way.
 */
// Yates (1937), The Design and Analysis of Factorial Experiments (confounding with blocks); Sun, Wu & Chen (1997), Technometrics 39:298-307 (choice of block generators)
import { DomainError, invalidInput } from '../errors';
import { randomInt, seededRandom } from '../random';
import { definingWords, parseWord, popcount, type Generator } from './fractional-factorial';

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
   * Number of factor words of each length (index 0..maxLength) an effect over the columns stands
   * for: one word, its support, in a full factorial; every word of its alias set in a fraction.
   */
  wordCounts(v: EffectVector): readonly number[];
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
 * Block generators with the least confounding. Choices are compared by the number of confounded
 * words of length 1 (main effects), then 2 (two-factor interactions), 3 and so on, the smallest
 * winning (the blocking analogue of minimum aberration). Small problems (up to 64 candidate
 * effects, up to 8 blocks) are searched exhaustively; every problem also gets a local search over the generator
 * matrix, and the better of the two is kept.
 */
export function chooseBlockGenerators(problem: BlockingProblem): BlockingChoice | null {
  const { s, m, q } = problem;
  if (q < 1 || q > m) return null;
  const exhaustive = s ** m <= 64 && q <= 3 ? depthFirstBlocking(problem) : null;
  const local = localSearchBlocking(problem);
  if (!exhaustive) return local;
  if (!local) return exhaustive;
  return compareCounts(local.counts, exhaustive.counts) < 0 ? local : exhaustive;
}

/**
 * Local search over the q × m generator matrix: column j says which generators contain factor j
 * (with which power when s > 2). Each sweep tries every other column for every factor and keeps a
 * change that lowers the count vector; seeded restarts from balanced and random matrices.
 */
function localSearchBlocking(problem: BlockingProblem): BlockingChoice | null {
  const { s, m, q, maxLength } = problem;
  const columns = s ** q;
  const digits = (c: number) => Array.from({ length: q }, (_, i) => Math.floor(c / s ** i) % s);
  const colDigits = Array.from({ length: columns }, (_, c) => digits(c));
  // Normalised non-zero combinations u of the generators: each gives one confounded effect.
  const combos = colDigits.filter((u) => u.find((x) => x !== 0) === 1);
  let work = 0;
  const evaluate = (cols: readonly number[]): BlockingChoice => {
    const counts = new Array<number>(maxLength + 1).fill(0);
    const confounded: number[][] = [];
    for (const u of combos) {
      const v = cols.map((c) => {
        const d = colDigits[c]!;
        let x = 0;
        for (let i = 0; i < q; i++) x += u[i]! * d[i]!;
        return x % s;
      });
      if (v.every((x) => x === 0)) {
        // Dependent generators: fewer blocks than asked; the worst possible choice.
        counts[0]!++;
        continue;
      }
      const nv = normalise(v, s);
      confounded.push(nv);
      const wc = problem.wordCounts(nv);
      work += m + wc.length;
      for (let l = 0; l < wc.length; l++) counts[Math.min(l, maxLength)]! += wc[l]!;
    }
    const generators = Array.from({ length: q }, (_, i) => normalise(cols.map((c) => colDigits[c]![i]!), s));
    return { generators, confounded, counts };
  };
  const rng = seededRandom(20_011);
  const nonZero = Array.from({ length: columns - 1 }, (_, c) => c + 1);
  // Balanced start: columns of many non-zero digits first, cycling (a simplex-like spread).
  const weight = (c: number) => colDigits[c]!.filter((x) => x !== 0).length;
  const balanced = nonZero.slice().sort((a, b) => weight(b) - weight(a) || a - b);
  const starts: number[][] = [Array.from({ length: m }, (_, j) => balanced[j % balanced.length]!)];
  const identityFirst = Array.from({ length: m }, (_, j) => (j < q ? s ** j : balanced[(j - q) % balanced.length]!));
  starts.push(identityFirst);
  for (let r = 0; r < 6; r++) starts.push(Array.from({ length: m }, () => nonZero[randomInt(rng, nonZero.length)]!));
  let best: BlockingChoice | null = null;
  // Work bound: stop sweeping after about 10^7 coefficient and word-count operations.
  const limit = 1e7;
  for (const start of starts) {
    const cols = start.slice();
    let current = evaluate(cols);
    let improved = true;
    while (improved && work < limit) {
      improved = false;
      for (let j = 0; j < m && work < limit; j++) {
        const keep = cols[j]!;
        let chosen = keep;
        for (let c = 0; c < columns; c++) {
          if (c === keep) continue;
          cols[j] = c;
          const trial = evaluate(cols);
          if (compareCounts(trial.counts, current.counts) < 0) {
            current = trial;
            chosen = c;
            improved = true;
          }
        }
        cols[j] = chosen;
      }
    }
    if (current.counts[0] === 0 && (!best || compareCounts(current.counts, best.counts) < 0)) best = current;
  }
  return best;
}

function depthFirstBlocking(problem: BlockingProblem): BlockingChoice | null {
  const { s, m, q, maxLength } = problem;
  const budget = problem.budget ?? 200_000;
  const cands = candidates(s, m).map((v) => {
    const wc = problem.wordCounts(v);
    return { v, shortest: wc.findIndex((c, l) => l > 0 && c > 0) };
  });
  cands.sort((a, b) => b.shortest - a.shortest || key(a.v, s) - key(b.v, s));
  const countsOf = (wc: readonly number[], into: number[]) => {
    for (let l = 0; l < wc.length; l++) into[Math.min(l, maxLength)]! += wc[l]!;
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
      for (const v of added) countsOf(problem.wordCounts(v), next);
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

/**
 * The confounding of generators given in advance (not searched): every normalised non-zero
 * combination of them is an effect confounded with blocks. Null when they are dependent.
 */
export function blockingOfGenerators(problem: BlockingProblem, generators: readonly EffectVector[]): BlockingChoice | null {
  const { s, m, maxLength } = problem;
  const q = generators.length;
  const counts = new Array<number>(maxLength + 1).fill(0);
  const confounded: number[][] = [];
  const seen = new Set<number>();
  for (let code = 1; code < s ** q; code++) {
    const u = Array.from({ length: q }, (_, i) => Math.floor(code / s ** i) % s);
    if (u.find((x) => x !== 0) !== 1) continue;
    let v = new Array<number>(m).fill(0);
    u.forEach((c, i) => (v = addScaled(v, generators[i]!, c, s)));
    if (v.every((x) => x === 0)) return null;
    const nv = normalise(v, s);
    if (seen.has(key(nv, s))) return null;
    seen.add(key(nv, s));
    confounded.push(nv);
    const wc = problem.wordCounts(nv);
    for (let l = 0; l < wc.length; l++) counts[Math.min(l, maxLength)]! += wc[l]!;
  }
  // Generators first, as in a searched choice.
  const isGenerator = (v: number[]) => generators.some((g) => key(normalise(g, s), s) === key(v, s));
  confounded.sort((a, b) => Number(isGenerator(b)) - Number(isGenerator(a)));
  return { generators: generators.map((g) => normalise(g, s)), confounded, counts };
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
  given?: { field: string; mainHint: string },
): asserts choice is BlockingChoice {
  const field = given?.field ?? 'blocks';
  if (!choice || (choice.counts[1] ?? 0) > 0) {
    const mains = choice ? confoundedLabels().filter((l) => !l.includes('*')) : [];
    const lost = mains.length ? ` (${mains.join(', ')} would be lost)` : '';
    throw new DomainError(
      'unsupported',
      given
        ? `these block generators confound the main effect${mains.length > 1 ? 's' : ''} ${mains.join(', ')} with blocks, counting their products and aliases; ${given.mainHint}`
        : `${blocks} blocks of this ${runs}-run design would confound a main effect with blocks${lost}; ask for fewer blocks or more runs`,
      field,
      mains.length ? { confounded: mains } : undefined,
    );
  }
  if (protectedLength >= 2 && (choice.counts[2] ?? 0) > 0) {
    const two = confoundedLabels().filter((l) => l.split('*').length === 2);
    throw new DomainError(
      'unsupported',
      `${blocks} blocks of this ${runs}-run design confound the two-factor interaction${two.length > 1 ? 's' : ''} ${two.join(', ')} with blocks; ${hint}`,
      field,
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
 *
 * `given` names the block generators instead of searching for them: interaction words over the
 * factors (letters "ABC", or names joined by *), read by parseWord. Then `blocks` must be
 * 2^given.length, and a run's block is the sign pattern of the words: block 1 + Σ 2^i over the
 * words i whose product is −1 on that run (block 1: every word +1).
 */
export function blockTwoLevel(
  k: number,
  fraction: readonly Generator[],
  blocks: number,
  protectedLength: number,
  names: readonly string[],
  hint?: string,
  given?: readonly string[],
): FactorialBlocking {
  const field = given ? 'blockGenerators' : 'blocks';
  const q = given ? given.length : powerOf(blocks, 2);
  const runs = 2 ** (k - fraction.length);
  if (q === null) throw new DomainError('unsupported', `blocks of a two-level design are a power of two (2, 4, 8 …) up to ${runs / 2}; got ${blocks}`, 'blocks');
  if (given && 2 ** given.length !== blocks) {
    throw new DomainError('invalid_input', `${given.length} block generators give ${2 ** given.length} blocks, but blocks is ${blocks}; give log2(blocks) generators or leave blocks out`, field);
  }
  const generated = new Set(fraction.map((g) => g.target));
  const base = [...Array(k).keys()].filter((j) => !generated.has(j));
  const words = definingWords(fraction).map((w) => w.mask);
  const givenMasks = given ? parseBlockGenerators(given, fraction, base, names) : null;
  if (q > base.length - 1) {
    throw new DomainError('unsupported', `this ${runs}-run design takes at most ${runs / 2} blocks (of two runs each); got ${blocks}`, field);
  }
  const maskOf = (v: EffectVector) => v.reduce((m, c, j) => (c ? m | (1 << base[j]!) : m), 0);
  const aliasSet = (mask: number) => [mask, ...words.map((w) => w ^ mask)].sort((a, b) => popcount(a) - popcount(b) || a - b);
  // Word counts by length of each alias set, computed once per set (2^k word operations in all).
  const memo = new Map<number, number[]>();
  const wordCounts = (v: EffectVector) => {
    const mask = maskOf(v);
    let counts = memo.get(mask);
    if (!counts) {
      counts = new Array<number>(k + 1).fill(0);
      counts[popcount(mask)]!++;
      for (const w of words) counts[popcount(w ^ mask)]!++;
      memo.set(mask, counts);
    }
    return counts;
  };
  const problem: BlockingProblem = { s: 2, m: base.length, q, maxLength: k, wordCounts };
  const choice = givenMasks ? blockingOfGenerators(problem, givenMasks.map((g) => g.vector)) : chooseBlockGenerators(problem);
  // Each confounded alias set by its shortest word, with the other words of up to three factors.
  const confounded = () =>
    (choice?.confounded ?? []).map((v) => {
      const [first, ...rest] = aliasSet(maskOf(v));
      return { effect: wordName(first!, names), aliases: rest.filter((m) => popcount(m) <= 3).map((m) => wordName(m, names)) };
    });
  const labels = () => confounded().flatMap((c) => [c.effect, ...c.aliases]);
  if (givenMasks) {
    const mainHint = `choose generator words whose products${fraction.length ? ' and their aliases' : ''} are all interactions, or give fewer generators`;
    const twoHint = 'choose generator words whose products all have three or more factors, or use the main-effects model';
    assertUsableBlocking(choice, blocks, runs, protectedLength, labels, twoHint, { field, mainHint });
    return {
      blocks,
      generators: givenMasks.map((g) => wordName(g.mask, names)),
      confounded: confounded(),
      blockOf: (coded) => givenMasks.reduce((b, g, i) => (g.factors.reduce((p, j) => p * Math.sign(coded[j]!), 1) < 0 ? b + 2 ** i : b), 1),
    };
  }
  assertUsableBlocking(choice, blocks, runs, protectedLength, labels, hint);
  return {
    blocks,
    generators: choice.generators.map((v) => wordName(maskOf(v), names)),
    confounded: confounded(),
    blockOf: (coded) => blockOfLevels(base.map((j) => (coded[j]! > 0 ? 0 : 1)), choice.generators, 2),
  };
}

/** A block generator given by the engineer: its word over all factors and its vector over the base factors. */
interface GivenBlockGenerator {
  mask: number;
  factors: number[];
  vector: EffectVector;
}

/**
 * Read block generator words and check them: known factors, two or more of them, not in the
 * defining relation of the fraction, independent (no word a product of others, aliases counted).
 */
function parseBlockGenerators(texts: readonly string[], fraction: readonly Generator[], base: readonly number[], names: readonly string[]): GivenBlockGenerator[] {
  const field = 'blockGenerators';
  const letters = (mask: number) => wordName(mask, names);
  const out: GivenBlockGenerator[] = [];
  // Span of the words read so far over the base factors: projected mask → the words it is the product of.
  const span = new Map<number, number[]>([[0, []]]);
  texts.forEach((text, i) => {
    const at = `${field}[${i}]`;
    if (/^\s*[-+]/.test(text)) throw invalidInput(at, `write a block generator as a word without a sign, e.g. "ABC"; got "${text}"`);
    const mask = parseWord(text, names, at);
    if (popcount(mask) < 2) {
      throw invalidInput(at, `a block generator is an interaction of two or more factors; "${text}" is the main effect of ${letters(mask)}, which blocks would swallow`);
    }
    // Replace each generated factor by its generator's word: the same column up to sign.
    let projected = mask;
    for (const g of fraction) if ((projected >> g.target) & 1) projected ^= g.mask | (1 << g.target);
    if (projected === 0) {
      throw invalidInput(at, `${letters(mask)} is a word of this fraction's defining relation, the same sign on every run, so it cannot split the runs into blocks; choose another interaction`);
    }
    const earlier = span.get(projected);
    if (earlier) {
      const product = earlier.map((e) => letters(out[e]!.mask)).join(' × ');
      throw invalidInput(
        at,
        `${letters(mask)} is the product of the other block generators ${product}${fraction.length ? ' (aliases counted)' : ''}, so it adds no blocks; give independent generators (no word a product of the others)`,
      );
    }
    for (const [m, idx] of [...span]) span.set(m ^ projected, [...idx, i]);
    out.push({
      mask,
      factors: [...Array(names.length).keys()].filter((j) => (mask >> j) & 1),
      vector: base.map((j) => (projected >> j) & 1),
    });
  });
  return out;
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
  const wordCounts = (v: EffectVector) => {
    const counts = new Array<number>(levelLists.length + 1).fill(0);
    counts[v.filter((c) => c !== 0).length]!++;
    return counts;
  };
  const choice = chooseBlockGenerators({ s, m: columns.length, q, maxLength: levelLists.length, wordCounts });
  const labels = () => (choice?.confounded ?? []).map((v) => effectLabel(v, colNames));
  assertUsableBlocking(choice, blocks, runs, protectedLength, labels);
  return {
    blocks,
    generators: choice.generators.map((v) => effectLabel(v, colNames)),
    confounded: labels().map((effect) => ({ effect, aliases: [] })),
    blockOf: (coded) => blockOfLevels(columns.map((j) => levelLists[j]!.indexOf(coded[j]!)), choice.generators, s),
  };
}
