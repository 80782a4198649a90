import { describe, expect, it } from 'vitest';
import { fitGaussianProcess, standardNormalCdf, suggestTrials, type SuggestionRequest } from '@/domain/surrogate';
import { PenalisedImprovement, PlugInImprovement, type ImprovementState } from '@/domain/surrogate/improvement';
import { LocalPenalty, codedDistance, lipschitzEstimate, meanGradientNorm } from '@/domain/surrogate/penalisation';
import { meansAtObservations, meanStandardised, predictStandardised } from '@/domain/surrogate/posterior';
import { seededRandom } from '@/domain/random';
import type { Factor } from '@/domain/factors';

// Invented 2-D response with one broad peak; 12 scattered observations in coded units.
const rng = seededRandom(21);
const x = Array.from({ length: 12 }, () => [2 * rng.next() - 1, 2 * rng.next() - 1]);
const f = (p: number[]) => Math.exp(-((p[0]! - 0.3) ** 2 + (p[1]! + 0.2) ** 2) / 0.3);
const y = x.map(f);
const model = fitGaussianProcess(x, y, { seed: 1 });
const grid: Float64Array[] = [];
for (let i = 0; i <= 40; i++) for (let j = 0; j <= 40; j++) grid.push(Float64Array.from([-1 + i / 20, -1 + j / 20]));

function greedy(state: ImprovementState, count: number, update: boolean): Float64Array[] {
  const chosen: Float64Array[] = [];
  const taken = new Set<number>();
  for (let b = 0; b < count; b++) {
    let best = -1;
    for (let c = 0; c < grid.length; c++) if (!taken.has(c) && (best < 0 || state.logScore(c) > state.logScore(best))) best = c;
    taken.add(best);
    chosen.push(grid[best]!);
    if (update) state.add(grid[best]!);
  }
  return chosen;
}

function minimumDistance(points: Float64Array[]): number {
  let m = Infinity;
  for (let i = 0; i < points.length; i++) for (let j = 0; j < i; j++) m = Math.min(m, codedDistance(points[i]!, points[j]!, [false, false]));
  return m;
}

describe('batches by local penalisation (González et al. 2016)', () => {
  const incumbent = Math.max(...meansAtObservations(model));
  // M for the penalty: the largest posterior mean over the candidates (as the strategy does).
  const reachable = Math.max(incumbent, ...grid.map((c) => meanStandardised(model, c)));

  it('spreads the batch: the smallest distance between its trials is larger than for the unpenalised top picks', () => {
    const plain = greedy(new PlugInImprovement(model, 1, grid, 6, incumbent), 6, false);
    const penalised = greedy(new PenalisedImprovement(new PlugInImprovement(model, 1, grid, 6, incumbent), new LocalPenalty(model, 1, grid, reachable)), 6, true);
    expect(minimumDistance(penalised)).toBeGreaterThan(minimumDistance(plain));
    // The first pick is the same: the penalty only starts once a trial is chosen.
    expect(Array.from(penalised[0]!)).toEqual(Array.from(plain[0]!));
  });

  it('the penalty is the probability of lying outside the ball that cannot hold the optimum', () => {
    const p = new LocalPenalty(model, 1, grid, reachable);
    const centre = grid[800]!;
    p.add(centre);
    // At the centre itself the distance is zero: Φ((μ_j − M) / σ_j), with μ_j ≤ M at most ½.
    const at = Math.exp(p.logPenaltyAt(centre));
    const mu = meanStandardised(model, centre);
    const sd = Math.sqrt(predictStandardised(model, centre).variance);
    expect(at).toBeCloseTo(standardNormalCdf((mu - reachable) / sd), 10);
    expect(at).toBeLessThanOrEqual(0.5);
    // Far away: no penalty.
    expect(Math.exp(p.logPenaltyAt([-1, -1]))).toBeGreaterThan(0.99);
    expect(p.logPenalty(800)).toBeCloseTo(p.logPenaltyAt(centre), 12);
  });

  it('Lipschitz estimate: the largest mean-gradient norm, the gradient agreeing with finite differences', () => {
    const point = [0.1, -0.4];
    const h = 1e-6;
    const fd = [0, 1].map((k) => {
      const up = point.slice();
      const down = point.slice();
      up[k] = up[k]! + h;
      down[k] = down[k]! - h;
      return (meanStandardised(model, up) - meanStandardised(model, down)) / (2 * h);
    });
    expect(meanGradientNorm(model, point)).toBeCloseTo(Math.hypot(fd[0]!, fd[1]!), 5);
    expect(lipschitzEstimate(model, grid)).toBeGreaterThanOrEqual(meanGradientNorm(model, point));
  });
});

describe('suggestTrials with batch "penalised"', () => {
  const factors: Factor[] = [
    { name: 'preload', kind: 'continuous', low: 1, high: 5, unit: 'mm' },
    { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  ];
  const data = x.map((p, i) => ({ preload: 3 + 2 * p[0]!, payload: 1 + p[1]!, height: 40 * y[i]! }));
  const request: SuggestionRequest = { factors, data, response: 'height', goal: 'maximize', count: 5, seed: 4 };

  it('answers a full batch of distinct trials, more spread than the believer batch, and says how it was built', () => {
    const penalised = suggestTrials({ ...request, batch: 'penalised' });
    const believer = suggestTrials(request);
    expect(penalised.suggestions).toHaveLength(5);
    expect(penalised.model.acquisition).toMatch(/local penalisation/);
    expect(believer.model.acquisition).toMatch(/kriging believer/);
    const coded = (r: typeof penalised) => r.suggestions.map((s) => Float64Array.from([(Number(s.values.preload) - 3) / 2, Number(s.values.payload) - 1]));
    expect(minimumDistance(coded(penalised))).toBeGreaterThan(0.02);
  });

  it('names the field when the batch mode is unknown', () => {
    expect(() => suggestTrials({ ...request, batch: 'together' as never })).toThrow(expect.objectContaining({ field: 'batch' }));
  });
});
