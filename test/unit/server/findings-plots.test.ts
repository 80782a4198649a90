/**
 * The findings page's plot data from a fit: effects ranked by size with intervals, residual and normal
 * quantile data, contour over two numeric factors with the trials, interaction lines, and — for a
 * two-level design — the half-normal plot with Lenth's margin of error. Data: a constructed 2^3 example
 * with a known large effect of A and an AB interaction; this checks the plumbing, the numbers are checked
 * against published data in test/reference/analysis.
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '@/domain/analysis';
import type { Factor } from '@/domain/factors';
import { findingsPlots } from '@/server/repos/analyses';

const factors: Factor[] = [
  { name: 'A', kind: 'continuous', low: -1, high: 1 },
  { name: 'B', kind: 'continuous', low: -1, high: 1 },
  { name: 'C', kind: 'continuous', low: -1, high: 1 },
];
const rows: Record<string, number>[] = [];
for (const a of [-1, 1]) for (const b of [-1, 1]) for (const c of [-1, 1]) rows.push({ A: a, B: b, C: c, y: 10 + 4 * a + 0.3 * b - 0.2 * c + 1.5 * a * b + 0.05 * (a + 2 * b + 3 * c) ** 2 });

describe('findings plot data', () => {
  const terms = ['A', 'B', 'C', 'A*B'];
  const result = analyze({ data: rows, response: 'y', terms, factors, coding: 'coded' });
  const plots = findingsPlots(result, rows);

  it('ranks effects by size, largest first, with intervals', () => {
    expect(plots.effects[0]!.label).toBe('A');
    expect(plots.effects[1]!.label).toBe('A*B');
    for (const e of plots.effects) expect(e.lo! <= e.value && e.value <= e.hi!).toBe(true);
  });

  it('gives residuals, normal quantiles, a contour grid with the trials and the interaction lines', () => {
    expect(plots.residuals).toHaveLength(8);
    expect(plots.normal.map((p) => p.y)).toEqual([...result.residuals].sort((a, b) => a - b));
    expect(plots.contour!.factorX).toBe('A');
    expect(plots.contour!.points).toHaveLength(8);
    expect(plots.interaction!.lines).toHaveLength(2);
  });

  it('adds a half-normal plot for a two-level design and none for a quadratic model', () => {
    expect(plots.halfNormal!.points).toHaveLength(4);
    expect(plots.halfNormal!.points.at(-1)!.label).toMatch(/^A/);
    const rows3 = [...rows, { A: 0, B: 0, C: 0, y: 10 }, { A: 0, B: 0, C: 0, y: 10.2 }];
    const quad = analyze({ data: rows3, response: 'y', terms: ['A', 'B', 'A^2'], factors, coding: 'coded' });
    expect(findingsPlots(quad, rows3).halfNormal).toBeNull();
  });
});
