import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import type { Factor } from '@/domain/factors';
import { generateDesign, type DesignResult } from '@/domain/design';
import { blockFullFactorial, blockTwoLevel, chooseBlockGenerators, powerOf } from '@/domain/design/blocking';
import { handleDesignRequest } from '@/server/api/designs';

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

function byBlock(d: DesignResult): Map<number, number[][]> {
  const m = new Map<number, number[][]>();
  for (const r of d.runs) {
    const b = r.block ?? 0;
    if (!m.has(b)) m.set(b, []);
    m.get(b)!.push(r.coded);
  }
  return m;
}

/** Every factor takes each of its levels equally often inside every block. */
function expectBalancedBlocks(d: DesignResult): void {
  for (const rows of byBlock(d).values()) {
    for (let j = 0; j < rows[0]!.length; j++) {
      const counts = new Map<number, number>();
      for (const r of rows) counts.set(r[j]!, (counts.get(r[j]!) ?? 0) + 1);
      expect(new Set(counts.values()).size).toBe(1);
    }
  }
}

describe('blocking two-level factorials by confounding', () => {
  it('2 blocks of a 2^k confound the k-factor interaction only', () => {
    for (let k = 2; k <= 6; k++) {
      const d = generateDesign({ factors: cont(k), method: 'full-factorial', model: 'main-effects', blocks: 2, seed: 3 });
      expect(d.diagnostics.blocking!.generators).toEqual([cont(k).map((f) => f.name).join('*')]);
      expect(d.diagnostics.blocking!.confounded).toHaveLength(1);
      expect(d.runs.map((r) => r.block)).not.toContain(undefined);
    }
  });

  it('property: blocks of equal size, every factor balanced in every block, block effects orthogonal to the model', () => {
    fc.assert(
      fc.property(fc.integer({ min: 3, max: 7 }), fc.integer({ min: 1, max: 4 }), fc.integer({ min: 1, max: 1000 }), (k, q, seed) => {
        fc.pre(q <= k - 1);
        const d = generateDesign({ factors: cont(k), method: 'full-factorial', model: 'main-effects', blocks: 2 ** q, seed });
        const blocks = byBlock(d);
        expect(blocks.size).toBe(2 ** q);
        for (const rows of blocks.values()) expect(rows).toHaveLength(2 ** (k - q));
        expectBalancedBlocks(d);
        const b = d.diagnostics.blocking!;
        expect(b.orthogonal).toBe(true);
        expect(b.maxBlockCorrelation).toBeLessThan(1e-12);
        expect(b.confounded).toHaveLength(2 ** q - 1);
        // Block effects estimable beside the main effects: the diagnostics model carries them at full rank.
        expect(d.diagnostics.rank).toBe(1 + k + 2 ** q - 1);
        // No main effect among the confounded effects.
        for (const c of b.confounded) expect(c.effect.split('*').length).toBeGreaterThan(1);
      }),
      { numRuns: 25 },
    );
  });

  it('keeps two-factor interactions clear of blocks when the model has them, or refuses naming blocks', () => {
    const d = generateDesign({ factors: cont(6), method: 'full-factorial', blocks: 8, seed: 1 });
    expect(d.model).toBe('interactions');
    for (const c of d.diagnostics.blocking!.confounded) expect(c.effect.split('*').length).toBeGreaterThanOrEqual(3);
    expect(d.diagnostics.blocking!.orthogonal).toBe(true);
    // A 2^4 in 4 blocks must confound a two-factor interaction (no two words of length ≥ 3 multiply to one of length ≥ 3).
    const e = catchError(() => generateDesign({ factors: cont(4), method: 'full-factorial', blocks: 4 }));
    expect(e.field).toBe('blocks');
    expect(e.message).toMatch(/two-factor interaction/);
    expect(e.message).toMatch(/main-effects model/);
  });

  it('blocks a fraction: main effects clear, aliases that fall on blocks marked in the alias list', () => {
    const d = generateDesign({ factors: cont(6), method: 'fractional-factorial', resolution: 4, runs: 32, blocks: 4, seed: 2 });
    const b = d.diagnostics.blocking!;
    expect(b.blocks).toBe(4);
    expectBalancedBlocks(d);
    expect(b.orthogonal).toBe(true);
    for (const c of b.confounded) for (const w of [c.effect, ...c.aliases]) expect(w.split('*').length).toBeGreaterThan(1);
    const marked = d.diagnostics.fraction!.aliases.filter((a) => a.aliases.includes('Blocks')).map((a) => a.effect);
    const confoundedWords = new Set(b.confounded.flatMap((c) => [c.effect, ...c.aliases]));
    for (const a of d.diagnostics.fraction!.aliases) expect(marked.includes(a.effect)).toBe(confoundedWords.has(a.effect));
  });

  it('a 16-run resolution IV fraction of 7 factors in 4 blocks confounds two-factor interaction chains, and says so', () => {
    const d = generateDesign({ factors: cont(7), method: 'fractional-factorial', resolution: 4, runs: 16, blocks: 4, seed: 2 });
    expect(d.diagnostics.fraction!.aliases.some((a) => a.aliases.includes('Blocks'))).toBe(true);
    expect(d.diagnostics.blocking!.orthogonal).toBe(true);
  });

  it('replicates are blocked alike, blocks numbered on; centre runs go in every block', () => {
    const d = generateDesign({ factors: cont(3), method: 'full-factorial', model: 'main-effects', blocks: 2, replicates: 2, centerPoints: 1, seed: 5 });
    const blocks = byBlock(d);
    expect([...blocks.keys()].sort()).toEqual([1, 2, 3, 4]);
    for (const rows of blocks.values()) {
      expect(rows).toHaveLength(5);
      expect(rows.filter((r) => r.every((c) => c === 0))).toHaveLength(1);
    }
    expect(d.diagnostics.blocking!.orthogonal).toBe(true);
  });

  it('refuses blocks that are not a power of two, too many blocks, and methods that are not blocked, naming blocks', () => {
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'full-factorial', model: 'main-effects', blocks: 3 })).field).toBe('blocks');
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'full-factorial', model: 'main-effects', blocks: 8 })).field).toBe('blocks');
    expect(catchError(() => generateDesign({ factors: cont(4), method: 'fractional-factorial', runs: 8, blocks: 8 })).field).toBe('blocks');
    expect(catchError(() => generateDesign({ factors: cont(4), method: 'plackett-burman', runs: 8, blocks: 2 })).field).toBe('blocks');
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'box-behnken', blocks: 2 })).field).toBe('blocks');
  });
});

describe('blocking mixed-level full factorials', () => {
  const mixed: Factor[] = [
    { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass'] },
    { name: 'legs', kind: 'discrete', values: [1, 2, 4] },
    { name: 'springs', kind: 'discrete', values: [2, 3, 4] },
    { name: 'payload', kind: 'continuous', low: 0, high: 2 },
  ];

  it('3 and 9 blocks from the three-level factors, the two-level factor crossed in every block', () => {
    for (const blocks of [3, 9]) {
      const d = generateDesign({ factors: mixed, method: 'full-factorial', model: 'main-effects', blocks, seed: 7 });
      const rows = byBlock(d);
      expect(rows.size).toBe(blocks);
      for (const r of rows.values()) expect(r).toHaveLength(54 / blocks);
      expectBalancedBlocks(d);
      expect(d.diagnostics.blocking!.orthogonal).toBe(true);
      expect(d.diagnostics.blocking!.confounded).toHaveLength((blocks - 1) / 2);
    }
    const d3 = generateDesign({ factors: mixed, method: 'full-factorial', model: 'main-effects', blocks: 3, seed: 7 });
    expect(d3.diagnostics.blocking!.generators).toEqual(['surface*legs*springs']);
  });

  it('a three-level interaction component with a power is named with it', () => {
    const b = blockFullFactorial([[0, 1, 2], [0, 1, 2], [0, 1, 2]], 9, 1, ['a', 'b', 'c']);
    expect(b.confounded).toHaveLength(4);
    expect(b.confounded.some((c) => c.effect.includes('^2'))).toBe(true);
  });

  it('refuses blocks no construction gives, listing the ones that exist', () => {
    const e = catchError(() => generateDesign({ factors: mixed, method: 'full-factorial', model: 'main-effects', blocks: 2 }));
    expect(e.field).toBe('blocks');
    expect(e.message).toMatch(/3, 9/);
    const lone = catchError(() =>
      generateDesign({ factors: [mixed[0]!, { name: 'gain', kind: 'discrete', values: [1, 2, 3, 4, 5] }], method: 'full-factorial', model: 'main-effects', blocks: 3 }),
    );
    expect(lone.field).toBe('blocks');
    expect(lone.message).toMatch(/optimal design/);
  });
});

describe('central composite designs in more than two blocks', () => {
  it('cube split by confounding a high-order interaction, axial runs in a block of their own, centre runs in every block', () => {
    const d = generateDesign({ factors: cont(4), method: 'central-composite', blocks: 3, centerPoints: 2, seed: 1 });
    const rows = byBlock(d);
    expect([...rows.keys()].sort()).toEqual([1, 2, 3]);
    expect(rows.get(1)).toHaveLength(10);
    expect(rows.get(2)).toHaveLength(10);
    expect(rows.get(3)).toHaveLength(10);
    for (const r of rows.get(3)!) expect(r.filter((c) => c !== 0).length).toBeLessThanOrEqual(1);
    for (const b of [1, 2, 3]) expect(rows.get(b)!.filter((r) => r.every((c) => c === 0))).toHaveLength(2);
    expect(d.diagnostics.blocking!.generators).toEqual(['x1*x2*x3*x4']);
  });

  it('property: with the orthogonal-blocking α every block is orthogonal to the full quadratic model', () => {
    const cases: { k: number; blocks: number; resolution?: number }[] = [
      { k: 3, blocks: 3 },
      { k: 4, blocks: 3 },
      { k: 5, blocks: 3, resolution: 6 },
      { k: 5, blocks: 5, resolution: 6 },
      { k: 6, blocks: 3 },
      { k: 7, blocks: 3 },
      { k: 7, blocks: 5 },
    ];
    fc.assert(
      fc.property(fc.constantFrom(...cases), fc.integer({ min: 1, max: 4 }), fc.integer({ min: 1, max: 2 }), ({ k, blocks, resolution }, n0, replicates) => {
        const d = generateDesign({ factors: cont(k), method: 'central-composite', blocks, resolution, centerPoints: n0, replicates, seed: 3 });
        expect(d.diagnostics.blocking!.blocks).toBe(blocks);
        expect(d.diagnostics.blocking!.orthogonal).toBe(true);
        expect(d.diagnostics.blocking!.maxBlockCorrelation).toBeLessThan(1e-9);
      }),
      { numRuns: 20 },
    );
  });

  it('other axial distances keep the blocks but not their orthogonality', () => {
    const d = generateDesign({ factors: cont(3), method: 'central-composite', blocks: 3, alpha: 'face-centred', centerPoints: 2, seed: 1 });
    expect(d.diagnostics.blocking!.orthogonal).toBe(false);
    expect(d.diagnostics.blocking!.maxBlockCorrelation).toBeGreaterThan(0.01);
  });

  it('refuses block counts the cube cannot take, naming blocks', () => {
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'central-composite', blocks: 4 })).field).toBe('blocks');
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'central-composite', blocks: 3, centerPoints: 0 })).field).toBe('centerPoints');
    // 2^2 in 2 blocks would confound x1*x2; the half fraction of 5 factors cannot be split either.
    expect(catchError(() => generateDesign({ factors: cont(2), method: 'central-composite', blocks: 3 })).field).toBe('blocks');
    const e = catchError(() => generateDesign({ factors: cont(5), method: 'central-composite', blocks: 3 }));
    expect(e.field).toBe('blocks');
    expect(e.message).toMatch(/higher resolution/);
  });
});

describe('restricted randomisation within blocks', () => {
  it('property: blocks stay together in order, runs shuffled inside, the same seed gives the same order', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10_000 }), (seed) => {
        const spec = { factors: cont(5), method: 'full-factorial' as const, model: 'main-effects' as const, blocks: 4, seed };
        const d = generateDesign(spec);
        const order = d.runs.map((r) => r.block!);
        expect(order).toEqual([...order].sort((a, b) => a - b));
        expect(generateDesign(spec).runs).toEqual(d.runs);
      }),
      { numRuns: 10 },
    );
    const a = generateDesign({ factors: cont(5), method: 'full-factorial', model: 'main-effects', blocks: 4, seed: 1 });
    const b = generateDesign({ factors: cont(5), method: 'full-factorial', model: 'main-effects', blocks: 4, seed: 2 });
    expect(a.runs.map((r) => r.coded.join())).not.toEqual(b.runs.map((r) => r.coded.join()));
    for (const blk of [1, 2, 3, 4]) {
      const set = (d: DesignResult) => d.runs.filter((r) => r.block === blk).map((r) => r.coded.join()).sort();
      expect(set(a)).toEqual(set(b));
    }
  });
});

describe('block generator search', () => {
  /** Exhaustive: every set of q independent effects over m two-level columns, smallest count vector. */
  function bruteForce(m: number, q: number): number[] {
    const masks = Array.from({ length: 2 ** m - 1 }, (_, i) => i + 1);
    const pop = (x: number) => x.toString(2).split('1').length - 1;
    let best: number[] | null = null;
    const cmp = (a: number[], b: number[]) => {
      for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i]! - b[i]!;
      return 0;
    };
    const rec = (start: number, span: number[], chosen: number) => {
      if (chosen === q) {
        const counts = new Array<number>(m + 1).fill(0);
        for (const v of span) if (v) counts[pop(v)]!++;
        if (!best || cmp(counts, best) < 0) best = counts;
        return;
      }
      for (let c = start; c < masks.length; c++) {
        if (span.includes(masks[c]!)) continue;
        rec(c + 1, [...span, ...span.map((u) => u ^ masks[c]!)], chosen + 1);
      }
    };
    rec(0, [0], 0);
    return best!;
  }

  it('finds the least confounding for every 2^m in 2^q blocks up to m = 7 (exhaustive check)', () => {
    for (let m = 2; m <= 7; m++) {
      for (let q = 1; q < m && q <= (m <= 6 ? 3 : 2); q++) {
        const wordCounts = (v: number[]) => {
          const c = new Array<number>(m + 1).fill(0);
          c[v.filter((x) => x).length]!++;
          return c;
        };
        const choice = chooseBlockGenerators({ s: 2, m, q, maxLength: m, wordCounts });
        expect(choice!.counts).toEqual(bruteForce(m, q));
      }
    }
  });

  it('large designs: 2^8 in 32 blocks keeps main effects clear, 2^8 in 16 and 2^10 in 16 blocks keep two-factor interactions clear', () => {
    const names = (k: number) => Array.from({ length: k }, (_, i) => `x${i + 1}`);
    const orders = (k: number, blocks: number, protect: number) => blockTwoLevel(k, [], blocks, protect, names(k)).confounded.map((c) => c.effect.split('*').length);
    expect(Math.min(...orders(8, 32, 1))).toBeGreaterThanOrEqual(2);
    expect(Math.min(...orders(8, 16, 2))).toBeGreaterThanOrEqual(3);
    expect(Math.min(...orders(10, 16, 2))).toBeGreaterThanOrEqual(3);
  });

  it('powerOf and the two-level entry point agree on what can be blocked', () => {
    expect(powerOf(8, 2)).toBe(3);
    expect(powerOf(9, 3)).toBe(2);
    expect(powerOf(6, 2)).toBeNull();
    const b = blockTwoLevel(5, [], 4, 1, ['a', 'b', 'c', 'd', 'e']);
    expect(b.confounded.map((c) => c.effect.split('*').length).sort()).toEqual([3, 3, 4]);
  });
});

describe('POST /api/v1/designs with blocks', () => {
  it('answers a block on every run and the blocking summary', () => {
    const out = handleDesignRequest({ factors: cont(4).map((f, i) => ({ ...f, name: ['payload', 'gain', 'stiffness', 'crouch'][i] })), method: 'full-factorial', model: 'main-effects', blocks: 4, seed: 9 });
    expect(out.runs.every((r) => r.block !== undefined && r.block >= 1 && r.block <= 4)).toBe(true);
    expect(out.diagnostics.blocking!.runsPerBlock).toEqual([1, 2, 3, 4].map((block) => ({ block, runs: 4 })));
    expect(out.diagnostics.blocking!.generators).toHaveLength(2);
  });
});

describe('optimal designs with random block effects', () => {
  const spec = { factors: cont(3), method: 'optimal' as const, model: 'interactions' as const, runs: 16, blocks: 4, blockEffects: 'random' as const, seed: 2, starts: 6 };

  it('reports log |X\'V⁻¹X| with V = I + η ZZ\' for the design it returns (checked by a direct computation)', () => {
    const eta = 0.5;
    const d = generateDesign({ ...spec, varianceRatio: eta });
    expect(d.diagnostics.optimal!.randomBlocks).toBe(4);
    expect(d.diagnostics.optimal!.varianceRatio).toBe(eta);
    expect(d.runs.every((r) => r.block !== undefined && r.wholePlot === undefined)).toBe(true);
    // X'V⁻¹X by blocks: V_b⁻¹ = I − η/(1 + η n_b) 11' (Sherman–Morrison), X the interactions model.
    const row = (c: number[]) => [1, c[0]!, c[1]!, c[2]!, c[0]! * c[1]!, c[0]! * c[2]!, c[1]! * c[2]!];
    const p = 7;
    const m = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (const b of [1, 2, 3, 4]) {
      const rows = d.runs.filter((r) => r.block === b).map((r) => row(r.coded));
      const sum = new Array<number>(p).fill(0);
      for (const x of rows) x.forEach((v, j) => (sum[j]! += v));
      const g = eta / (1 + eta * rows.length);
      for (let a = 0; a < p; a++) for (let c = 0; c < p; c++) m[a]![c]! += rows.reduce((s, x) => s + x[a]! * x[c]!, 0) - g * sum[a]! * sum[c]!;
    }
    // log-determinant by Cholesky.
    let logDet = 0;
    const l = m.map((r) => r.slice());
    for (let j = 0; j < p; j++) {
      for (let k = 0; k < j; k++) for (let i = j; i < p; i++) l[i]![j]! -= l[i]![k]! * l[j]![k]!;
      const piv = Math.sqrt(l[j]![j]!);
      logDet += 2 * Math.log(piv);
      for (let i = j; i < p; i++) l[i]![j]! /= piv;
    }
    expect(d.diagnostics.optimal!.value).toBeCloseTo(logDet, 8);
    expect(generateDesign({ ...spec, varianceRatio: eta }).runs).toEqual(d.runs);
  });

  it('a large variance ratio gives a design as good under fixed blocks as the fixed-block search (Goos & Vandebroek 2001)', () => {
    const fixed = generateDesign({ ...spec, blockEffects: 'fixed' });
    const random = generateDesign({ ...spec, varianceRatio: 1000 });
    expect(random.diagnostics.dEfficiency).toBeGreaterThan(0.99 * fixed.diagnostics.dEfficiency);
    expect(random.diagnostics.blocking!.orthogonal).toBe(true);
  });

  it('refuses random blocks outside optimal designs or without blocks, naming the field', () => {
    expect(catchError(() => generateDesign({ factors: cont(3), method: 'full-factorial', blocks: 2, blockEffects: 'random' })).field).toBe('blockEffects');
    expect(catchError(() => generateDesign({ ...spec, blocks: 1 })).field).toBe('blocks');
  });
});

describe('blocked requests never fail other than with a named field', () => {
  const factorArb = fc.oneof(
    fc.constant({ kind: 'continuous', low: 0, high: 1 }),
    fc.constant({ kind: 'discrete', values: [1, 2, 4] }),
    fc.constant({ kind: 'discrete', values: [0, 5] }),
    fc.constant({ kind: 'categorical', levels: ['a', 'b'] }),
    fc.constant({ kind: 'categorical', levels: ['a', 'b', 'c'] }),
  );
  it('property: a design or a DomainError naming a field (never another exception)', () => {
    fc.assert(
      fc.property(
        fc.array(factorArb, { minLength: 1, maxLength: 6 }),
        fc.constantFrom('full-factorial', 'fractional-factorial', 'central-composite', 'optimal'),
        fc.integer({ min: 1, max: 20 }),
        fc.constantFrom('main-effects', 'interactions', 'quadratic'),
        fc.integer({ min: 0, max: 2 }),
        (kinds, method, blocks, model, centerPoints) => {
          const factors = kinds.map((k, i) => ({ ...k, name: `f${i}` })) as Factor[];
          try {
            const d = generateDesign({ factors, method: method as 'optimal', blocks, model: model as 'quadratic', centerPoints, seed: 1, starts: 2 });
            if (blocks > 1) expect(d.diagnostics.blocking?.blocks).toBeGreaterThan(1);
          } catch (e) {
            expect(e).toBeInstanceOf(DomainError);
            expect((e as DomainError).field).toBeTruthy();
          }
        },
      ),
      { numRuns: 60, seed: 11 },
    );
  });
});
