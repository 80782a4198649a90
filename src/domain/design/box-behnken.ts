/**
 * Box–Behnken designs for 3 to 7 factors: for each block of a balanced incomplete block design, a
 * two-level factorial in the block's factors with the other factors at their centre, then centre runs.
 */
// Box & Behnken (1960), Technometrics 2:455-475
import { DomainError, invalidInput } from '../errors';
import type { Factor } from '../factors';
import { centreRuns } from './full-factorial';
import { standardOrder } from './levels';
import type { CodedRun } from './types';

/** The incomplete block designs of the method (factors numbered from 1). */
export const BOX_BEHNKEN_BLOCKS: Readonly<Record<number, readonly (readonly number[])[]>> = {
  3: [[1, 2], [1, 3], [2, 3]],
  4: [[1, 2], [3, 4], [1, 4], [2, 3], [1, 3], [2, 4]],
  5: [[1, 2], [1, 3], [3, 4], [4, 5], [2, 5], [1, 4], [1, 5], [2, 3], [2, 4], [3, 5]],
  6: [[1, 2, 4], [2, 3, 5], [3, 4, 6], [1, 4, 5], [2, 5, 6], [1, 3, 6]],
  7: [[4, 5, 6], [1, 6, 7], [2, 5, 7], [1, 2, 4], [3, 4, 7], [1, 3, 5], [2, 3, 6]],
};

/** Usual number of centre runs for k = 3..7 (common practice, no source retrieved). */
export const BOX_BEHNKEN_CENTRE_RUNS: Readonly<Record<number, number>> = { 3: 3, 4: 3, 5: 6, 6: 6, 7: 6 };

export function boxBehnkenDesign(factors: readonly Factor[], options: { centerPoints?: number; replicates?: number } = {}): CodedRun[] {
  const k = factors.length;
  factors.forEach((f, i) => {
    if (f.kind !== 'continuous') {
      throw new DomainError('unsupported', `a Box–Behnken design needs continuous factors; ${f.name} is ${f.kind}`, `factors[${i}].kind`);
    }
  });
  const blocks = BOX_BEHNKEN_BLOCKS[k];
  if (!blocks) throw invalidInput('factors', 'a Box–Behnken design here takes 3 to 7 factors');
  const replicates = options.replicates ?? 1;
  if (!Number.isInteger(replicates) || replicates < 1) throw invalidInput('replicates', 'replicates must be a whole number of at least 1');
  const n0 = options.centerPoints ?? BOX_BEHNKEN_CENTRE_RUNS[k]!;
  if (!Number.isInteger(n0) || n0 < 0) throw invalidInput('centerPoints', 'centerPoints must be a whole number of at least 0');
  const runs: CodedRun[] = [];
  for (let r = 0; r < replicates; r++) {
    for (const block of blocks) {
      for (const signs of standardOrder(block.map(() => [-1, 1]))) {
        const coded = new Array<number>(k).fill(0);
        block.forEach((j, t) => (coded[j - 1] = signs[t]!));
        runs.push({ coded });
      }
    }
  }
  runs.push(...centreRuns(factors, n0));
  return runs;
}
