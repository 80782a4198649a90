// Reference: NIST/SEMATECH e-Handbook 5.3.3.4.7 summary table of 2^(k-p) designs (test/fixtures/fractional-factorial-2kp/SOURCE.md)
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import {
  chooseFraction,
  FACTOR_LETTERS,
  fractionRuns,
  fractionStructure,
  generateDesign,
  parseGenerators,
  searchGenerators,
} from '@/domain/design';

interface Entry {
  k: number;
  p: number;
  runs: number;
  design: string;
  resolution: number;
  generators_letters: string[];
  defining_relation?: string;
  word_length_pattern: Record<string, number>;
}

const table = JSON.parse(readFileSync(new URL('../../fixtures/fractional-factorial-2kp/designs.json', import.meta.url), 'utf8')) as { designs: Entry[] };

const names = (k: number) => [...FACTOR_LETTERS.slice(0, k)];
const wlpOf = (pattern: number[]) => Object.fromEntries(pattern.map((c, i) => [String(i), c]).filter(([, c]) => c !== 0));

function lexLessOrEqual(a: number[], b: number[]): boolean {
  for (let i = 0; i < Math.max(a.length, b.length); i++) {
    if ((a[i] ?? 0) !== (b[i] ?? 0)) return (a[i] ?? 0) < (b[i] ?? 0);
  }
  return true;
}

describe('fractional factorials against the NIST e-Handbook 5.3.3.4.7 table', () => {
  for (const d of table.designs) {
    it(`${d.design}: generators ${d.generators_letters.join(', ')} give the resolution, word-length pattern and defining relation`, () => {
      const gens = parseGenerators(d.generators_letters.map((g) => g.replace(/\s/g, '')), names(d.k));
      const st = fractionStructure(d.k, gens);
      expect(st.runs).toBe(d.runs);
      expect(st.resolution).toBe(d.resolution);
      expect(wlpOf(st.wordLengthPattern)).toEqual(d.word_length_pattern);
      if (d.defining_relation) {
        const expected = d.defining_relation.replace(/^I = /, '').split(' = ').map((w) => [...w].sort().join('')).sort();
        const ours = st.words.map((w) => [...Array(d.k).keys()].filter((j) => (w.mask >> j) & 1).map((j) => FACTOR_LETTERS[j]).join('')).sort();
        expect(ours).toEqual(expected);
      }
      // The runs are an orthogonal ±1 array: every column balanced, every pair of columns orthogonal.
      const runs = fractionRuns(d.k, gens);
      for (let a = 0; a < d.k; a++) {
        expect(runs.reduce((s, r) => s + r[a]!, 0)).toBe(0);
        for (let b = a + 1; b < d.k; b++) expect(runs.reduce((s, r) => s + r[a]! * r[b]!, 0)).toBe(0);
      }
    });

    it(`${d.design}: the search reaches resolution ${d.resolution} in ${d.runs} runs with no more aberration`, () => {
      const gens = searchGenerators(d.k, d.k - d.p, d.resolution);
      expect(gens).not.toBeNull();
      const st = fractionStructure(d.k, gens!);
      expect(st.resolution).toBeGreaterThanOrEqual(d.resolution);
      const published = new Array<number>(d.k + 1).fill(0);
      for (const [len, c] of Object.entries(d.word_length_pattern)) published[Number(len)] = c;
      expect(lexLessOrEqual(st.wordLengthPattern, published)).toBe(true);
    });
  }
});

describe('fractional factorial designs through generateDesign', () => {
  const five: Factor[] = ['payload', 'gain', 'stiffness', 'damping', 'angle'].map((name) => ({ name, kind: 'continuous', low: 0, high: 1 }));

  it('chooses the 16-run resolution V half fraction for the interactions model and lists no aliases among two-factor terms', () => {
    const d = generateDesign({ factors: five, method: 'fractional-factorial', model: 'interactions', seed: 2 });
    expect(d.runs).toHaveLength(16);
    expect(d.diagnostics.fraction!.resolution).toBe(5);
    expect(d.diagnostics.fraction!.wordLengthPattern).toEqual({ '5': 1 });
    expect(d.diagnostics.fraction!.aliases.every((a) => a.aliases.length === 0)).toBe(true);
    expect(d.diagnostics.dEfficiency).toBeCloseTo(1, 12);
  });

  it('follows given generators and reports signed aliases of a resolution III fraction', () => {
    const d = generateDesign({ factors: five, method: 'fractional-factorial', generators: ['D=AB', 'E=-AC'], model: 'main-effects' });
    expect(d.runs).toHaveLength(8);
    const f = d.diagnostics.fraction!;
    expect(f.generators).toEqual(['D=AB', 'E=-AC']);
    expect(f.definingRelation).toEqual(['ABD', '-ACE', '-BCDE']);
    expect(f.aliases.find((a) => a.effect === 'payload')!.aliases).toEqual(['gain*damping', '-stiffness*angle']);
    for (const r of d.runs) expect(r.coded[4]).toBe(-r.coded[0]! * r.coded[2]!);
  });

  it('refuses the interactions model on a resolution IV fraction, naming the aliased interactions', () => {
    expect(() => generateDesign({ factors: five.slice(0, 4), method: 'fractional-factorial', resolution: 4, model: 'interactions' })).toThrow(
      /cannot estimate .*\*/,
    );
  });

  it('gives the highest resolution a run count allows', () => {
    const d = generateDesign({ factors: five, method: 'fractional-factorial', runs: 8 });
    expect(d.diagnostics.fraction!.resolution).toBe(3);
    expect(d.runs).toHaveLength(8);
  });

  it('names bad generators', () => {
    expect(() => generateDesign({ factors: five, method: 'fractional-factorial', generators: ['E=A'] })).toThrow(/at least two base factors/);
    expect(() => generateDesign({ factors: five, method: 'fractional-factorial', generators: ['E=AZ'] })).toThrow(/factor letters/);
  });
});

describe('fractional factorial limits', () => {
  it('chooses a resolution IV fraction of 20 factors in 64 runs within its work budget', () => {
    const names = Array.from({ length: 20 }, (_, i) => `x${i + 1}`);
    const st = fractionStructure(20, chooseFraction(20, 4));
    expect(st.runs).toBe(64);
    expect(st.resolution).toBe(4);
    expect(() => parseGenerators(Array.from({ length: 16 }, (_, i) => `${names[i + 4]}=x1*x2*x3*x4`), [...names, 'x21'])).toThrow(/at most 15 generators/);
    expect(() => chooseFraction(21, 3)).toThrow(/at most 20 factors/);
  });
});
