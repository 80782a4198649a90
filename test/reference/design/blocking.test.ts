// References: NIST/SEMATECH e-Handbook 5.3.3.4.7 summary table of 2^(k-p) designs
// (test/fixtures/fractional-factorial-2kp/SOURCE.md); CCD axial distances, NIST e-Handbook 5.3.3.6.1 and
// Box & Hunter (1957) (test/fixtures/ccd-alpha/SOURCE.md).
// The shared reference holds no published table of block generators (for example Sun, Wu & Chen 1997)
// and no table of blocked composite designs: the blocking itself is checked here on the published
// fractions and axial distances, by properties computed in the test (status: computed).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import type { Factor } from '@/domain/factors';
import { FACTOR_LETTERS, generateDesign } from '@/domain/design';

interface Entry {
  k: number;
  p: number;
  runs: number;
  design: string;
  generators_letters: string[];
}
const table = JSON.parse(readFileSync(new URL('../../fixtures/fractional-factorial-2kp/designs.json', import.meta.url), 'utf8')) as { designs: Entry[] };

interface CcdRow {
  k: number;
  fraction_p: number;
  factorial_runs: number;
  alpha_rotatable: number;
}
const ccd = JSON.parse(readFileSync(new URL('../../fixtures/ccd-alpha/ccd_alpha.json', import.meta.url), 'utf8')) as { table: CcdRow[] };

const lettered = (k: number): Factor[] => [...FACTOR_LETTERS.slice(0, k)].map((name) => ({ name, kind: 'continuous', low: -1, high: 1 }));

describe('published fractions in two blocks (NIST e-Handbook 5.3.3.4.7 generators)', () => {
  // Up to 64 runs keeps the test short; the larger fractions behave alike.
  for (const d of table.designs.filter((x) => x.runs <= 64)) {
    // A fraction of N runs has N − 1 alias sets, each main effect in its own: two blocks keep every
    // main effect clear exactly when some alias set holds none, that is when the fraction is not saturated.
    const saturated = d.runs - 1 === d.k;
    it(`${d.design}: ${saturated ? 'saturated, so two blocks are refused naming blocks' : 'two blocks, main effects clear, every factor balanced in each block'}`, () => {
      const spec = { factors: lettered(d.k), method: 'fractional-factorial' as const, generators: d.generators_letters, blocks: 2, seed: 1 };
      if (saturated) {
        let error: unknown;
        try {
          generateDesign(spec);
        } catch (e) {
          error = e;
        }
        expect(error).toBeInstanceOf(DomainError);
        expect((error as DomainError).field).toBe('blocks');
        return;
      }
      const out = generateDesign(spec);
      const b = out.diagnostics.blocking!;
      expect(b.runsPerBlock).toEqual([1, 2].map((block) => ({ block, runs: d.runs / 2 })));
      expect(b.orthogonal).toBe(true);
      // The confounded alias set holds no main effect.
      const words = [b.confounded[0]!.effect, ...b.confounded[0]!.aliases];
      for (const w of words) expect(w.split('*').length).toBeGreaterThan(1);
      for (const blk of [1, 2]) {
        const rows = out.runs.filter((r) => r.block === blk);
        for (let j = 0; j < d.k; j++) expect(rows.filter((r) => r.coded[j] === 1)).toHaveLength(d.runs / 4);
      }
    });
  }
});

describe('orthogonally blocked composite designs against the published axial distances', () => {
  const rotatable = (k: number, p = 0) => ccd.table.find((r) => r.k === k && r.fraction_p === p)!.alpha_rotatable;

  it('k = 2: cube and axial blocks with 3 centre runs each; the orthogonal-blocking α equals the rotatable α 1.414', () => {
    const d = generateDesign({ factors: lettered(2), method: 'central-composite', blocks: 2, centerPoints: 3, seed: 1 });
    expect(d.diagnostics.axialDistance).toBeCloseTo(rotatable(2), 6);
    expect(d.diagnostics.blocking!.orthogonal).toBe(true);
  });

  it('k = 4: the cube in two blocks by confounding ABCD, 2 centre runs per block; α equals the rotatable α 2.000', () => {
    const d = generateDesign({ factors: lettered(4), method: 'central-composite', blocks: 3, centerPoints: 2, seed: 1 });
    expect(d.diagnostics.axialDistance).toBeCloseTo(rotatable(4), 6);
    expect(d.diagnostics.blocking!.generators).toEqual(['A*B*C*D']);
    expect(d.diagnostics.blocking!.orthogonal).toBe(true);
    expect(d.diagnostics.runs).toBe(16 + 8 + 3 * 2);
  });

  it('the rotatable α of the reference keeps the blocks but, where it differs from the blocking α, not their orthogonality', () => {
    const d = generateDesign({ factors: lettered(3), method: 'central-composite', blocks: 3, centerPoints: 2, alpha: 'rotatable', seed: 1 });
    expect(d.diagnostics.axialDistance).toBeCloseTo(rotatable(3), 6);
    expect(d.diagnostics.blocking!.orthogonal).toBe(false);
    expect(d.diagnostics.notes.some((n) => n.includes('1.6330'))).toBe(true);
  });
});
