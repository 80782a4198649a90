// Reference: Plackett & Burman (1946), Biometrika 33:305-325, cyclic generators (test/fixtures/plackett-burman/SOURCE.md)
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Factor } from '@/domain/factors';
import { generateDesign, plackettBurmanMatrix, PLACKETT_BURMAN_GENERATORS } from '@/domain/design';

const expected = JSON.parse(readFileSync(new URL('../../fixtures/plackett-burman/expected.json', import.meta.url), 'utf8')) as {
  generators: Record<string, string>;
};

function readCsv(n: number): number[][] {
  const text = readFileSync(new URL(`../../fixtures/plackett-burman/pb${n}.csv`, import.meta.url), 'utf8');
  return text
    .trim()
    .split('\n')
    .slice(1)
    .map((line) => line.split(',').map(Number));
}

describe('Plackett–Burman designs against the published generators (Plackett & Burman 1946)', () => {
  for (const n of [8, 12, 16, 20, 24]) {
    it(`N = ${n}: same generator and the same matrix, row for row; [1 | X] is Hadamard`, () => {
      expect(PLACKETT_BURMAN_GENERATORS[n]).toBe(expected.generators[String(n)]);
      const x = plackettBurmanMatrix(n);
      expect(x).toEqual(readCsv(n));
      const h = x.map((r) => [1, ...r]);
      for (let a = 0; a < n; a++) {
        for (let b = a; b < n; b++) expect(h.reduce((s, r) => s + r[a]! * r[b]!, 0)).toBe(a === b ? n : 0);
      }
    });
  }

  it('PB12: each main effect is partially aliased (correlation ±1/3) with every two-factor interaction not involving it', () => {
    const x = plackettBurmanMatrix(12);
    for (let a = 0; a < 11; a++) {
      for (let b = 0; b < 11; b++) {
        for (let c = b + 1; c < 11; c++) {
          if (a === b || a === c) continue;
          const r = x.reduce((s, row) => s + row[a]! * row[b]! * row[c]!, 0) / 12;
          expect(Math.abs(r)).toBeCloseTo(1 / 3, 12);
        }
      }
    }
  });

  it('screens 9 factors (two of them categorical) in 12 runs with orthogonal main effects', () => {
    const factors: Factor[] = [
      ...Array.from({ length: 7 }, (_, i): Factor => ({ name: `x${i + 1}`, kind: 'continuous', low: 0, high: 10 })),
      { name: 'surface', kind: 'categorical', levels: ['turf', 'ice'] },
      { name: 'legs', kind: 'discrete', values: [2, 4] },
    ];
    const d = generateDesign({ factors, method: 'plackett-burman', seed: 8 });
    expect(d.runs).toHaveLength(12);
    expect(d.runs.filter((r) => r.values.surface === 'ice')).toHaveLength(6);
    expect(d.diagnostics.dEfficiency).toBeCloseTo(1, 12);
    expect(() => generateDesign({ factors, method: 'plackett-burman', runs: 8 })).toThrow(/at most 7 factors/);
  });
});
