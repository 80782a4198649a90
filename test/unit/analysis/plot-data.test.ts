import { describe, expect, it } from 'vitest';
import { analyze, interactionPlot, sliceData, steepestAscent } from '@/domain/analysis';

// Invented: efficiency against payload (g) on two surfaces, with an interaction.
const data = [
  { payload: 0, surface: 'grass', eff: 0.4 }, { payload: 2, surface: 'grass', eff: 0.3 },
  { payload: 0, surface: 'ice', eff: 0.35 }, { payload: 2, surface: 'ice', eff: 0.15 },
  { payload: 1, surface: 'grass', eff: 0.36 }, { payload: 1, surface: 'ice', eff: 0.26 },
];

describe('plot data from a fitted model', () => {
  const result = analyze({ data, response: 'eff', terms: ['payload', 'surface', 'payload*surface'] });

  it('interaction plot: one line per surface over the payload range, equal to the fitted cell means', () => {
    const plot = interactionPlot(result, 'payload', 'surface');
    expect(plot.levelsA).toEqual([0, 2]);
    expect(plot.lines.map((l) => l.levelB)).toEqual(['grass', 'ice']);
    const grass = plot.lines[0]!.predicted;
    const ice = plot.lines[1]!.predicted;
    // Fitted straight lines through each surface's three runs (least squares by hand).
    // Grass runs (0, 0.40), (1, 0.36), (2, 0.30): slope −0.05, mean 1.06/3, so the line is 1.06/3 + 0.05 at payload 0.
    expect(grass[0]).toBeCloseTo(1.06 / 3 + 0.05, 10);
    expect(grass[0]! - grass[1]!).toBeCloseTo(0.1, 10);
    expect(ice[0]! - ice[1]!).toBeCloseTo(0.2, 10);
  });

  it('slice along payload with the surface held', () => {
    const slice = sliceData(result, 'payload', { surface: 'ice' }, 3);
    expect(slice.x).toEqual([0, 1, 2]);
    expect(slice.predicted[0]! - slice.predicted[2]!).toBeCloseTo(0.2, 10);
    expect(slice.held).toEqual({ surface: 'ice' });
  });

  it('steepest ascent of a first-order model runs straight along the gradient', () => {
    const plane = analyze({
      data: [
        { a: -1, b: -1, y: 1 }, { a: 1, b: -1, y: 3 }, { a: -1, b: 1, y: 2 }, { a: 1, b: 1, y: 4 }, { a: 0, b: 0, y: 2.5 },
      ],
      response: 'y',
      terms: ['a', 'b'],
    });
    const path = steepestAscent(plane, { steps: 3, stepSize: 1 });
    const last = path.at(-1)!.point;
    expect(last[0]! / last[1]!).toBeCloseTo(2, 9); // gradient (1, 0.5)
    expect(path.at(-1)!.distance).toBeCloseTo(3, 9);
  });
});
