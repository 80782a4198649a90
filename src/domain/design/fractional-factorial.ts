/**
 * Two-level fractional factorial designs 2^(k−p): built from generators, or chosen for a resolution
 * by a search for minimum aberration; with the defining relation, word-length pattern and the alias
 * list of main effects and two-factor interactions.
 */
// Box & Hunter (1961), Technometrics 3:311-351 and 449-458 (2^(k-p) fractional factorial designs)
import { DomainError, invalidInput } from '../errors';
import type { Factor } from '../factors';
import { standardOrder } from './levels';

/** Factor letters in the usual order, skipping I (it stands for the identity in a defining relation). */
export const FACTOR_LETTERS = 'ABCDEFGHJKLMNOPQRSTUVWXYZ';

/** A word of the defining relation: a set of factors (bit j = factor j) with a sign. */
export interface DefiningWord {
  mask: number;
  sign: 1 | -1;
}

/** A generator: factor `target` = sign × product of the factors in `mask` (all of them base factors). */
export interface Generator {
  target: number;
  mask: number;
  sign: 1 | -1;
}

export interface FractionStructure {
  factorCount: number;
  runs: number;
  generators: Generator[];
  /** All 2^p − 1 words of the defining relation. */
  words: DefiningWord[];
  resolution: number;
  /** wordLengthPattern[L] = number of words of length L (index 0..k). */
  wordLengthPattern: number[];
}

export function popcount(x: number): number {
  let c = 0;
  while (x) {
    x &= x - 1;
    c++;
  }
  return c;
}

/** Letters of a word, e.g. mask 0b1011 → "ABD". */
export function wordLetters(mask: number): string {
  let s = '';
  for (let j = 0; mask >> j; j++) if ((mask >> j) & 1) s += FACTOR_LETTERS[j];
  return s;
}

function parseLetters(text: string, k: number, field: string): number {
  let mask = 0;
  for (const ch of text) {
    const j = FACTOR_LETTERS.indexOf(ch);
    if (j < 0 || j >= k) throw invalidInput(field, `"${ch}" is not one of the factor letters ${FACTOR_LETTERS.slice(0, k)}`);
    if ((mask >> j) & 1) throw invalidInput(field, `letter ${ch} appears twice`);
    mask |= 1 << j;
  }
  return mask;
}

/** One factor of a word: its name, its letter (A, B, C ... skipping I) or its number (1..k). */
function factorIndex(token: string, factorNames: readonly string[], at: string): number {
  const k = factorNames.length;
  const t = token.trim();
  const named = factorNames.indexOf(t);
  if (named >= 0) return named;
  if (/^\d+$/.test(t) && Number(t) >= 1 && Number(t) <= k) return Number(t) - 1;
  if (t.length === 1 && FACTOR_LETTERS.indexOf(t) >= 0 && FACTOR_LETTERS.indexOf(t) < k) return FACTOR_LETTERS.indexOf(t);
  throw invalidInput(at, `"${t}" is not a factor name, letter (${FACTOR_LETTERS.slice(0, k)}) or number (1..${k})`);
}

/**
 * Read an interaction word as a set of factors (bit j = factor j): letters run together ("ABC"),
 * or names, letters or numbers joined by * or spaces ("speed*payload", "1 2 3"). A factor named
 * twice is refused.
 */
export function parseWord(text: string, factorNames: readonly string[], at: string): number {
  const k = factorNames.length;
  const t = text.trim();
  const add = (mask: number, j: number) => {
    if ((mask >> j) & 1) throw invalidInput(at, `${FACTOR_LETTERS[j] ?? factorNames[j]} (${factorNames[j]}) appears twice in "${t}"`);
    return mask | (1 << j);
  };
  if (t.includes('*')) return t.split('*').reduce((m, part) => add(m, factorIndex(part, factorNames, at)), 0);
  if (/\s/.test(t)) return t.split(/\s+/).reduce((m, part) => add(m, factorIndex(part, factorNames, at)), 0);
  if (/^\d$/.test(t) || factorNames.includes(t)) return 1 << factorIndex(t, factorNames, at);
  return parseLetters(t, k, at);
}

/**
 * Read generators such as "E=ABCD", "E = -ABC", "5 = 1 2 3 4" or "surface=payload*gain". Factors are
 * lettered A, B, C ... (skipping I) or numbered 1, 2, 3 ... in the order given.
 */
export function parseGenerators(texts: readonly string[], factorNames: readonly string[], field = 'generators'): Generator[] {
  const gens = texts.map((text, i) => {
    const at = `${field}[${i}]`;
    const sides = text.split('=');
    if (sides.length !== 2) throw invalidInput(at, `write a generator as "E=ABC" (new factor = product of base factors), got "${text}"`);
    let left = sides[0]!.trim();
    let right = sides[1]!.trim();
    let sign: 1 | -1 = 1;
    if (left.startsWith('-')) {
      sign = -1;
      left = left.slice(1);
    }
    if (right.startsWith('-')) {
      sign = (sign * -1) as 1 | -1;
      right = right.slice(1).trim();
    } else if (right.startsWith('+')) right = right.slice(1).trim();
    const target = factorIndex(left, factorNames, at);
    const mask = parseWord(right, factorNames, at);
    if (popcount(mask) < 2) throw invalidInput(at, 'a generator is a product of at least two base factors; otherwise two main effects coincide');
    if ((mask >> target) & 1) throw invalidInput(at, 'a generated factor cannot appear in its own generator');
    return { target, mask, sign };
  });
  if (gens.length > MAX_GENERATORS) throw invalidInput(field, `a fraction here has at most ${MAX_GENERATORS} generators`);
  const targets = new Set<number>();
  gens.forEach((g, i) => {
    if (targets.has(g.target)) throw invalidInput(`${field}[${i}]`, 'two generators define the same factor');
    targets.add(g.target);
  });
  gens.forEach((g, i) => {
    for (const t of targets) {
      if ((g.mask >> t) & 1) throw invalidInput(`${field}[${i}]`, 'generators may use base factors only (factors no generator defines)');
    }
  });
  return gens;
}

/** The defining relation: every product of the generator words. */
export function definingWords(generators: readonly Generator[]): DefiningWord[] {
  let words: DefiningWord[] = [];
  for (const g of generators) {
    const w: DefiningWord = { mask: g.mask | (1 << g.target), sign: g.sign };
    words = [...words, w, ...words.map((u) => ({ mask: u.mask ^ w.mask, sign: (u.sign * w.sign) as 1 | -1 }))];
  }
  return words;
}

export function wordLengthPattern(words: readonly DefiningWord[], k: number): number[] {
  const wlp = new Array<number>(k + 1).fill(0);
  for (const w of words) wlp[popcount(w.mask)]!++;
  return wlp;
}

export function fractionStructure(k: number, generators: readonly Generator[]): FractionStructure {
  const words = definingWords(generators);
  const wlp = wordLengthPattern(words, k);
  const lengths = words.map((w) => popcount(w.mask));
  return {
    factorCount: k,
    runs: 2 ** (k - generators.length),
    generators: generators.slice(),
    words,
    resolution: lengths.length ? Math.min(...lengths) : Infinity,
    wordLengthPattern: wlp,
  };
}

/** Coded ±1 runs of the fraction: base factors in standard order, generated columns as signed products. */
export function fractionRuns(k: number, generators: readonly Generator[]): number[][] {
  const generated = new Set(generators.map((g) => g.target));
  const base = [...Array(k).keys()].filter((j) => !generated.has(j));
  const baseRuns = standardOrder(base.map(() => [-1, 1]));
  return baseRuns.map((b) => {
    const row = new Array<number>(k).fill(0);
    base.forEach((j, i) => (row[j] = b[i]!));
    for (const g of generators) {
      let v: number = g.sign;
      for (let j = 0; j < k; j++) if ((g.mask >> j) & 1) v *= row[j]!;
      row[g.target] = v;
    }
    return row;
  });
}

function compareWlp(a: readonly number[], b: readonly number[]): number {
  for (let i = 0; i < Math.max(a.length, b.length); i++) {
    const d = (a[i] ?? 0) - (b[i] ?? 0);
    if (d !== 0) return d;
  }
  return 0;
}

/**
 * Generators for k factors in 2^m runs with resolution ≥ `resolution`, least aberration first: a
 * depth-first search over columns of the base factors, pruned by resolution, keeping the design
 * with the smallest word-length pattern. The search stops after `budget` nodes (or the matching
 * amount of word operations) and keeps the best found (exhaustive for the usual sizes). Returns null
 * when none is found.
 */
// Fries & Hunter (1980), Technometrics 22:601-608 (minimum aberration)
export function searchGenerators(k: number, baseCount: number, resolution: number, budget = 200_000): Generator[] | null {
  const p = k - baseCount;
  if (p < 0) return null;
  if (p === 0) return [];
  const candidates: number[] = [];
  for (let mask = 1; mask < 1 << baseCount; mask++) if (popcount(mask) >= Math.max(2, resolution - 1)) candidates.push(mask);
  // Longer words first: they tend to give less aberration, so good designs are met early.
  candidates.sort((a, b) => popcount(b) - popcount(a) || a - b);
  let best: { masks: number[]; wlp: number[] } | null = null;
  let nodes = 0;
  // Work counts word operations: once a design is found the search stops after `budget` of them,
  // and gives up after 20 × budget when none is found (the caller then tries more runs).
  let work = 0;
  const chosen: number[] = [];
  const recurse = (start: number, words: number[]) => {
    if (nodes++ > budget || work > (best ? budget * 10 : budget * 100)) return;
    if (chosen.length === p) {
      const wlp = new Array<number>(k + 1).fill(0);
      for (const w of words) wlp[popcount(w)]!++;
      if (!best || compareWlp(wlp, best.wlp) < 0) best = { masks: chosen.slice(), wlp };
      return;
    }
    for (let c = start; c <= candidates.length - (p - chosen.length); c++) {
      if (work > (best ? budget * 10 : budget * 100)) return;
      const w = candidates[c]! | (1 << (baseCount + chosen.length));
      work += 2 * words.length + 1;
      const added = [w, ...words.map((u) => u ^ w)];
      if (added.some((u) => popcount(u) < resolution)) continue;
      // Prune when the words so far are already worse than the best complete design.
      if (best) {
        const partial = new Array<number>(k + 1).fill(0);
        for (const u of words) partial[popcount(u)]!++;
        for (const u of added) partial[popcount(u)]!++;
        if (compareWlp(partial, best.wlp) > 0) continue;
      }
      chosen.push(candidates[c]!);
      recurse(c + 1, [...words, ...added]);
      chosen.pop();
    }
  };
  recurse(0, []);
  if (!best) return null;
  const found: { masks: number[] } = best;
  return found.masks.map((mask, i) => ({ target: baseCount + i, mask, sign: 1 as const }));
}

/** The smallest fraction (fewest runs) of k two-level factors with at least the given resolution. */
/** Most generators a fraction may have here (its defining relation has 2^p − 1 words). */
export const MAX_GENERATORS = 15;

export function chooseFraction(k: number, resolution: number, runs?: number): Generator[] {
  if (k > 20) throw new DomainError('unsupported', 'a two-level fraction here takes at most 20 factors; use a Plackett–Burman or an optimal design', 'factors');
  if (runs !== undefined) {
    const m = Math.log2(runs);
    if (!Number.isInteger(m) || m > k || 2 ** m < k + 1) {
      throw invalidInput('runs', `runs for a two-level fraction of ${k} factors is a power of two from ${2 ** Math.ceil(Math.log2(k + 1))} to ${2 ** k}`);
    }
    if (k - m > MAX_GENERATORS) throw invalidInput('runs', `a fraction here has at most ${MAX_GENERATORS} generators; ask for at least ${2 ** (k - MAX_GENERATORS)} runs`);
    const g = searchGenerators(k, m, resolution);
    if (!g) throw new DomainError('unsupported', `no ${runs}-run fraction of ${k} factors has resolution ${resolution}; allow more runs or a lower resolution`, 'resolution');
    return g;
  }
  for (let m = Math.max(Math.ceil(Math.log2(k + 1)), k - MAX_GENERATORS); m <= k; m++) {
    const g = searchGenerators(k, m, resolution);
    if (g) return g;
  }
  return [];
}

export interface AliasEntry {
  effect: string;
  aliases: string[];
}

/**
 * Aliases among main effects and two-factor interactions: for each such effect, the others it is
 * confounded with (with a leading "-" when the defining word is negative), named by factor.
 */
export function aliasList(k: number, words: readonly DefiningWord[], names: readonly string[]): AliasEntry[] {
  const label = (mask: number, sign: number) => {
    const parts: string[] = [];
    for (let j = 0; j < k; j++) if ((mask >> j) & 1) parts.push(names[j]!);
    return (sign < 0 ? '-' : '') + parts.join('*');
  };
  const effects: number[] = [];
  for (let a = 0; a < k; a++) effects.push(1 << a);
  for (let a = 0; a < k; a++) for (let b = a + 1; b < k; b++) effects.push((1 << a) | (1 << b));
  return effects.map((e) => ({
    effect: label(e, 1),
    aliases: words
      .map((w) => ({ mask: e ^ w.mask, sign: w.sign }))
      .filter((x) => popcount(x.mask) <= 2)
      .sort((x, y) => popcount(x.mask) - popcount(y.mask) || x.mask - y.mask)
      .map((x) => label(x.mask, x.sign)),
  }));
}

/** Factors of a two-level design: continuous, or discrete / categorical with exactly two levels. */
export function assertTwoLevel(factors: readonly Factor[], method: string): void {
  factors.forEach((f, i) => {
    const levels = f.kind === 'discrete' ? f.values.length : f.kind === 'categorical' ? f.levels.length : 2;
    if (levels !== 2) {
      throw new DomainError('unsupported', `a ${method} design needs two-level factors; ${f.name} has ${levels} levels`, `factors[${i}]`);
    }
  });
}

/** A ±1 coded value as the factor's coded value: categorical −1 → first level (0), +1 → second (1). */
export function twoLevelCoded(f: Factor, pm: number): number {
  if (f.kind === 'categorical') return pm < 0 ? 0 : 1;
  return pm;
}
