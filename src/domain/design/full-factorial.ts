/** Full factorial designs with mixed levels, replicates and centre points. */
// Box, Hunter & Hunter (2005), Statistics for Experimenters, 2nd ed., ch. 5 (factorial designs)
import { invalidInput } from '../errors';
import type { Factor, StandardModel } from '../factors';
import { codedCentre, codedLevels, standardOrder } from './levels';
import type { CodedRun } from './types';

export interface FullFactorialOptions {
  /** A quadratic model puts continuous factors at three levels (−1, 0, +1); otherwise two. */
  model?: StandardModel;
  replicates?: number;
  centerPoints?: number;
}

/** Every combination of levels in standard order (first factor fastest), replicated, then centre runs. */
export function fullFactorialDesign(factors: readonly Factor[], options: FullFactorialOptions = {}): CodedRun[] {
  const replicates = options.replicates ?? 1;
  const centerPoints = options.centerPoints ?? 0;
  if (!Number.isInteger(replicates) || replicates < 1) throw invalidInput('replicates', 'replicates must be a whole number of at least 1');
  if (!Number.isInteger(centerPoints) || centerPoints < 0) throw invalidInput('centerPoints', 'centerPoints must be a whole number of at least 0');
  const continuousLevels = options.model === 'quadratic' ? [-1, 0, 1] : [-1, 1];
  const lists = factors.map((f) => codedLevels(f, continuousLevels));
  const total = lists.reduce((a, l) => a * l.length, 1) * replicates;
  if (total > 100_000) {
    throw invalidInput('factors', `a full factorial here has ${total} runs; use a fractional factorial or an optimal design instead`);
  }
  const base = standardOrder(lists);
  const runs: CodedRun[] = [];
  for (let r = 0; r < replicates; r++) for (const row of base) runs.push({ coded: row.slice() });
  runs.push(...centreRuns(factors, centerPoints));
  return runs;
}

/**
 * Centre runs: numeric factors at their centre; categorical factors cycle through their level
 * combinations so the centre runs spread over them (common practice, no source).
 */
export function centreRuns(factors: readonly Factor[], count: number): CodedRun[] {
  if (count === 0) return [];
  if (!factors.some((f) => f.kind !== 'categorical')) {
    throw invalidInput('centerPoints', 'centre points need at least one numeric factor; set centerPoints to 0');
  }
  const categorical = factors.map((f) => (f.kind === 'categorical' ? f.levels.map((_, i) => i) : [0]));
  const combos = standardOrder(categorical);
  const runs: CodedRun[] = [];
  for (let c = 0; c < count; c++) {
    const combo = combos[c % combos.length]!;
    runs.push({ coded: factors.map((f, i) => (f.kind === 'categorical' ? combo[i]! : codedCentre(f))) });
  }
  return runs;
}
