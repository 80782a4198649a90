/**
 * Block generators named by the engineer (blockGenerators) for two-level full factorials and
 * fractions: block assignment checked by brute force, every refusal, and agreement with the
 * searched blocking when its own generators are given back.
 */
import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import type { Factor } from '@/domain/factors';
import { generateDesign, type DesignResult, type DesignSpec } from '@/domain/design';
import { FACTOR_LETTERS } from '@/domain/design/fractional-factorial';
import { campaignDesignSchema } from '@/server/api/schemas/campaign';
import { campaignDesignSpec } from '@/server/repos/runs';
import { blockGeneratorWords, designBody, showsBlockGenerators } from '@/components/DesignPanel';

const cont = (k: number): Factor[] => Array.from({ length: k }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous', low: 0, high: 10 }));

function catchError(fn: () => unknown): DomainError {
  try {
    fn();
  } catch (e) {
    if (e instanceof DomainError) return e;
    throw e;
  }
  throw new Error('expected a DomainError');
}

/** Factor indices of a word written in letters ("ACE") or names joined by * ("x1*x3*x5"). */
function factorsOf(word: string, names: readonly string[]): number[] {
  if (word.includes('*')) return word.split('*').map((n) => names.indexOf(n));
  return [...word].map((ch) => FACTOR_LETTERS.indexOf(ch));
}

/**
 * Brute force: every run's block is 1 + Σ 2^i over the words i whose product of coded ±1 columns is
 * −1 on that run (centre runs excepted: they sit in every block).
 */
function expectSignPatternBlocks(d: DesignResult, words: readonly string[], names: readonly string[]): void {
  const blocks = 2 ** words.length;
  for (const r of d.runs) {
    if (r.coded.every((c) => c === 0)) continue;
    let expected = 1;
    words.forEach((w, i) => {
      const product = factorsOf(w, names).reduce((p, j) => p * r.coded[j]!, 1);
      expect(Math.abs(product)).toBe(1);
      if (product < 0) expected += 2 ** i;
    });
    expect(((r.block! - 1) % blocks) + 1).toBe(expected);
  }
}

/** The partition of the factorial runs into blocks, as a set of sorted run keys per block. */
function partition(d: DesignResult): Set<string> {
  const byBlock = new Map<number, string[]>();
  for (const r of d.runs) {
    if (!byBlock.has(r.block!)) byBlock.set(r.block!, []);
    byBlock.get(r.block!)!.push(r.coded.join(','));
  }
  return new Set([...byBlock.values()].map((rows) => rows.sort().join(' | ')));
}

const confoundedWords = (d: DesignResult) => d.diagnostics.blocking!.confounded.map((c) => [c.effect, ...c.aliases].join(' = ')).sort();

describe('block generators given for a two-level full factorial', () => {
  it('2^5 in 4 blocks from ["ABC", "CDE"]: blocks are the sign patterns, the diagnostics show the generators and all three confounded effects', () => {
    const d = generateDesign({ factors: cont(5), method: 'full-factorial', blockGenerators: ['ABC', 'CDE'], seed: 7 });
    const b = d.diagnostics.blocking!;
    expect(b.blocks).toBe(4);
    expect(b.generators).toEqual(['x1*x2*x3', 'x3*x4*x5']);
    expect(b.confounded.map((c) => c.effect).sort()).toEqual(['x1*x2*x3', 'x1*x2*x4*x5', 'x3*x4*x5']);
    expect(b.runsPerBlock).toEqual([1, 2, 3, 4].map((block) => ({ block, runs: 8 })));
    expect(b.orthogonal).toBe(true);
    expectSignPatternBlocks(d, ['ABC', 'CDE'], cont(5).map((f) => f.name));
  });

  it('takes names joined by *, numbers or letters alike, and blocks that agree with the generators', () => {
    const names = cont(4).map((f) => f.name);
    const a = generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blocks: 2, blockGenerators: ['x1*x2*x3*x4'], seed: 2 });
    const b = generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blockGenerators: ['1 2 3 4'], seed: 2 });
    const c = generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blockGenerators: ['ABCD'], seed: 2 });
    expect(a.runs).toEqual(b.runs);
    expect(a.runs).toEqual(c.runs);
    expectSignPatternBlocks(a, ['ABCD'], names);
  });

  it('categorical and discrete two-level factors: low level (first) is −1, high level +1', () => {
    const factors: Factor[] = [
      { name: 'surface', kind: 'categorical', levels: ['turf', 'ice'] },
      { name: 'payload', kind: 'discrete', values: [2, 1] },
      { name: 'gain', kind: 'continuous', low: 10, high: 30 },
    ];
    const d = generateDesign({ factors, method: 'full-factorial', model: 'main-effects', blockGenerators: ['ABC'], centerPoints: 0, seed: 3 });
    for (const r of d.runs) {
      const signs = [r.values.surface === 'ice' ? 1 : -1, r.values.payload === 2 ? 1 : -1, (r.values.gain as number) > 20 ? 1 : -1];
      expect(r.block).toBe(signs.reduce((p, s) => p * s, 1) < 0 ? 2 : 1);
    }
  });

  it('replicates repeat the blocks (numbered on) and centre runs go in every block', () => {
    const d = generateDesign({ factors: cont(4), method: 'full-factorial', blockGenerators: ['ABCD'], replicates: 2, centerPoints: 1, seed: 4 });
    expect(d.diagnostics.blocking!.runsPerBlock).toEqual([1, 2, 3, 4].map((block) => ({ block, runs: 9 })));
    expectSignPatternBlocks(d, ['ABCD'], cont(4).map((f) => f.name));
  });
});

describe('block generators given for a two-level fraction', () => {
  const fraction = (blockGenerators: string[], model: DesignSpec['model'] = 'interactions'): DesignSpec => ({
    factors: cont(7),
    method: 'fractional-factorial',
    generators: ['G=ABCDEF'],
    model,
    blockGenerators,
    seed: 11,
  });

  it('2^(7−1) in 4 blocks from ["ABC", "CDE"]: sign-pattern blocks, each confounded effect with its alias', () => {
    const d = generateDesign(fraction(['ABC', 'CDE']));
    const b = d.diagnostics.blocking!;
    expect(b.generators).toEqual(['x1*x2*x3', 'x3*x4*x5']);
    // ABC·CDE = ABDE = CFG: each alias set by its shortest word (aliases of four or more factors left out).
    expect(confoundedWords(d)).toEqual(['x1*x2*x3', 'x3*x4*x5', 'x3*x6*x7']);
    expect(b.orthogonal).toBe(true);
    expectSignPatternBlocks(d, ['ABC', 'CDE'], cont(7).map((f) => f.name));
  });

  it('a word with a generated factor: its block is the sign of that very word (negative generator included)', () => {
    const spec: DesignSpec = { factors: cont(6), method: 'fractional-factorial', generators: ['F=-ABCDE'], model: 'main-effects', blockGenerators: ['ABF', 'ACD'], seed: 5 };
    const d = generateDesign(spec);
    expectSignPatternBlocks(d, ['ABF', 'ACD'], cont(6).map((f) => f.name));
    // ABF = −CDE in this fraction: the confounded effect is shown by its shortest word with the alias.
    expect(d.diagnostics.blocking!.generators[0]).toBe('x1*x2*x6');
    expect(confoundedWords(d)).toContain('x3*x4*x5 = x1*x2*x6');
  });

  it('marks the main effects and two-factor interactions confounded with blocks in the alias list', () => {
    const d = generateDesign({ factors: cont(6), method: 'fractional-factorial', generators: ['F=ABCDE'], model: 'main-effects', blockGenerators: ['ABC', 'CDE'], seed: 1 });
    // ABC·CDE = ABDE = CF in this fraction: a two-factor interaction on blocks, allowed under main effects.
    const cf = d.diagnostics.fraction!.aliases.find((a) => a.effect === 'x3*x6');
    expect(cf?.aliases).toContain('Blocks');
  });
});

describe('refusals of given block generators, each naming the field, the lost effect and the fix', () => {
  const full = (blockGenerators: string[], extra: Partial<DesignSpec> = {}): DesignSpec => ({ factors: cont(5), method: 'full-factorial', model: 'main-effects', blockGenerators, ...extra });

  it('letters that are no factor, a main effect as a generator, a signed word, a factor twice', () => {
    const unknown = catchError(() => generateDesign(full(['ABZ'])));
    expect(unknown.field).toBe('blockGenerators[0]');
    expect(unknown.message).toMatch(/"Z" is not one of the factor letters ABCDE/);
    const single = catchError(() => generateDesign(full(['ABC', 'D'])));
    expect(single.field).toBe('blockGenerators[1]');
    expect(single.message).toMatch(/two or more factors.*main effect of x4/);
    expect(catchError(() => generateDesign(full(['-ABC']))).field).toBe('blockGenerators[0]');
    expect(catchError(() => generateDesign(full(['ABA']))).message).toMatch(/appears twice/);
    expect(catchError(() => generateDesign(full(['x1*x1*x2']))).field).toBe('blockGenerators[0]');
  });

  it('dependent generators: a word that is the product of the others, named', () => {
    const e = catchError(() => generateDesign(full(['ABC', 'CDE', 'ABDE'])));
    expect(e.field).toBe('blockGenerators[2]');
    expect(e.message).toMatch(/x1\*x2\*x4\*x5 is the product of the other block generators x1\*x2\*x3 × x3\*x4\*x5/);
    expect(e.message).toMatch(/give independent generators/);
    expect(catchError(() => generateDesign(full(['ABC', 'ABC']))).field).toBe('blockGenerators[1]');
  });

  it('in a fraction: dependent through the aliases, and a word of the defining relation', () => {
    const frac = (blockGenerators: string[]): DesignSpec => ({ factors: cont(6), method: 'fractional-factorial', generators: ['F=ABCDE'], model: 'main-effects', blockGenerators });
    // ABC · DEF = ABCDEF = I: DEF is the same column as ABC.
    const dep = catchError(() => generateDesign(frac(['ABC', 'DEF'])));
    expect(dep.field).toBe('blockGenerators[1]');
    expect(dep.message).toMatch(/aliases counted/);
    const word = catchError(() => generateDesign(frac(['ABCDEF'])));
    expect(word.field).toBe('blockGenerators[0]');
    expect(word.message).toMatch(/defining relation/);
  });

  it('a main effect confounded with blocks by a product of the generators', () => {
    const e = catchError(() => generateDesign(full(['ABC', 'AB'])));
    expect(e.field).toBe('blockGenerators');
    expect(e.message).toMatch(/main effect x3 with blocks/);
    expect(e.message).toMatch(/choose generator words/);
    expect(e.details).toEqual({ confounded: ['x3'] });
  });

  it('a main effect confounded through an alias of the fraction', () => {
    // ABC · DEF = ABCDEF = G in the 2^(7−1) with G = ABCDEF.
    const e = catchError(() => generateDesign({ factors: cont(7), method: 'fractional-factorial', generators: ['G=ABCDEF'], model: 'main-effects', blockGenerators: ['ABC', 'DEF'] }));
    expect(e.field).toBe('blockGenerators');
    expect(e.message).toMatch(/main effect x7/);
    expect(e.message).toMatch(/aliases/);
  });

  it('a two-factor interaction under the interactions model (allowed under main effects)', () => {
    const e = catchError(() => generateDesign({ factors: cont(4), method: 'full-factorial', blockGenerators: ['ABC', 'BCD'] }));
    expect(e.field).toBe('blockGenerators');
    expect(e.message).toMatch(/two-factor interaction x1\*x4/);
    expect(e.message).toMatch(/three or more factors, or use the main-effects model/);
    expect(generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blockGenerators: ['ABC', 'BCD'] }).diagnostics.blocking!.blocks).toBe(4);
  });

  it('blocks that disagree with the number of generators', () => {
    const e = catchError(() => generateDesign(full(['ABC', 'CDE'], { blocks: 8 })));
    expect(e.field).toBe('blockGenerators');
    expect(e.message).toMatch(/2 block generators give 2\^2 = 4 blocks, but blocks is 8/);
    expect(catchError(() => generateDesign(full(['ABC'], { blocks: 1 }))).field).toBe('blockGenerators');
  });

  it('methods and factors that are not two-level', () => {
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'central-composite', blockGenerators: ['ABC'] })).field).toBe('blockGenerators');
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'optimal', runs: 8, blockGenerators: ['ABC'] })).field).toBe('blockGenerators');
    const quad = catchError(() => generateDesign({ factors: cont(3), method: 'full-factorial', model: 'quadratic', blockGenerators: ['ABC'] }));
    expect(quad.field).toBe('blockGenerators');
    expect(quad.message).toMatch(/x1 has 3 levels/);
    const three: Factor[] = [...cont(2), { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass'] }];
    expect(catchError(() => generateDesign({ factors: three, method: 'full-factorial', model: 'main-effects', blockGenerators: ['ABC'] })).message).toMatch(/surface has 3 levels/);
  });

  it('an empty list means the blocks are searched as before', () => {
    const a = generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blocks: 2, blockGenerators: [], seed: 1 });
    const b = generateDesign({ factors: cont(4), method: 'full-factorial', model: 'main-effects', blocks: 2, seed: 1 });
    expect(a).toEqual(b);
  });
});

describe('given generators agree with the searched choice', () => {
  it('full factorials: the searched generators given back confound the same effects and split the runs alike', () => {
    for (const [k, blocks, model] of [
      [4, 2, 'interactions'],
      [5, 4, 'main-effects'],
      [6, 8, 'interactions'],
      [7, 16, 'main-effects'],
    ] as const) {
      const searched = generateDesign({ factors: cont(k), method: 'full-factorial', model, blocks, seed: 3 });
      const given = generateDesign({ factors: cont(k), method: 'full-factorial', model, blockGenerators: searched.diagnostics.blocking!.generators, seed: 3 });
      expect(given.diagnostics.blocking!.generators).toEqual(searched.diagnostics.blocking!.generators);
      expect(confoundedWords(given)).toEqual(confoundedWords(searched));
      expect(partition(given)).toEqual(partition(searched));
      expect(given.diagnostics.dEfficiency).toBeCloseTo(searched.diagnostics.dEfficiency, 12);
    }
  });

  it('fractions: the same, with aliases', () => {
    for (const [k, generators, blocks] of [
      [6, ['F=ABCDE'], 4],
      [7, ['F=ABCD', 'G=ABDE'], 4],
      [8, ['G=ABCD', 'H=ABEF'], 8],
    ] as const) {
      const spec: DesignSpec = { factors: cont(k), method: 'fractional-factorial', generators: [...generators], model: 'main-effects', seed: 8 };
      const searched = generateDesign({ ...spec, blocks });
      const given = generateDesign({ ...spec, blockGenerators: searched.diagnostics.blocking!.generators });
      expect(confoundedWords(given)).toEqual(confoundedWords(searched));
      expect(partition(given)).toEqual(partition(searched));
      expect(given.diagnostics.fraction).toEqual(searched.diagnostics.fraction);
    }
  });
});

describe('campaign design route settings', () => {
  it('the campaign schema takes blockGenerators and the spec passes them on', () => {
    const input = campaignDesignSchema.parse({ method: 'full-factorial', model: 'main-effects', blockGenerators: [' ABC ', 'CDE'] });
    const spec = campaignDesignSpec(cont(5), input);
    expect(spec.blockGenerators).toEqual(['ABC', 'CDE']);
    expect(generateDesign(spec).diagnostics.blocking!.blocks).toBe(4);
    expect(campaignDesignSpec(cont(5), campaignDesignSchema.parse({ method: 'full-factorial' })).blockGenerators).toBeUndefined();
    expect(campaignDesignSchema.safeParse({ method: 'full-factorial', blockGenerators: 'ABC' }).success).toBe(false);
  });
});

describe('design form: the block generator field', () => {
  const form = { method: 'fractional-factorial', model: '', centerPoints: '', runs: '', seed: '1', blocks: '4', blockGenerators: ' ABC, CDE ;' };

  it('is shown for blocked two-level designs only', () => {
    expect(showsBlockGenerators(form)).toBe(true);
    expect(showsBlockGenerators({ ...form, blocks: '', blockGenerators: '' })).toBe(false);
    expect(showsBlockGenerators({ ...form, blocks: '1', blockGenerators: '' })).toBe(false);
    expect(showsBlockGenerators({ ...form, method: 'central-composite' })).toBe(false);
    expect(showsBlockGenerators({ ...form, method: 'full-factorial', blocks: '2', blockGenerators: '' })).toBe(true);
  });

  it('sends the words split at commas or semicolons, and nothing when the field is hidden or empty', () => {
    expect(blockGeneratorWords('ABC, CDE;x1*x2*x4 ,')).toEqual(['ABC', 'CDE', 'x1*x2*x4']);
    expect(designBody(form)).toEqual({ method: 'fractional-factorial', seed: 1, blocks: 4, blockGenerators: ['ABC', 'CDE'] });
    expect(designBody({ ...form, blockGenerators: '' })).toEqual({ method: 'fractional-factorial', seed: 1, blocks: 4 });
    expect(designBody({ ...form, method: 'central-composite' })).toEqual({ method: 'central-composite', seed: 1, blocks: 4 });
    expect(designBody({ ...form, method: 'sobol' })).toEqual({ method: 'sobol', seed: 1 });
  });
});
