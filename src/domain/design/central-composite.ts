/** Central composite designs: a two-level cube, axial (star) points at ±α and centre runs. */
// Box & Wilson (1951), J. R. Statist. Soc. B 13:1-45 (central composite design)
import { DomainError, invalidInput } from '../errors';
import type { Factor } from '../factors';
import { centreRuns } from './full-factorial';
import { standardOrder } from './levels';
import type { AxialDistance, CodedRun } from './types';

/** Rotatable axial distance α = F^(1/4), F the number of cube runs. */
// Box & Hunter (1957), Ann. Math. Statist. 28:195-241 (rotatability)
export function rotatableAlpha(cubeRuns: number): number {
  return Math.pow(cubeRuns, 0.25);
}

/** Orthogonal axial distance α = [F (√(F + T) − √F)² / 4]^(1/4), T = 2k + n0 axial and centre runs. */
// Myers, Montgomery & Anderson-Cook (2016), Response Surface Methodology, 4th ed., §7.4 (orthogonal CCD)
export function orthogonalAlpha(cubeRuns: number, factorCount: number, centreCount: number): number {
  const t = 2 * factorCount + centreCount;
  const f = cubeRuns;
  return Math.pow((f * (Math.sqrt(f + t) - Math.sqrt(f)) ** 2) / 4, 0.25);
}

export interface CentralCompositeOptions {
  alpha?: AxialDistance;
  centerPoints?: number;
  replicates?: number;
}

export interface CentralCompositeDesign {
  runs: CodedRun[];
  alpha: number;
  cubeRuns: number;
}

/** Default centre runs of a central composite design (common practice, no source). */
export const DEFAULT_CCD_CENTRE_RUNS = 3;

export function centralCompositeDesign(factors: readonly Factor[], options: CentralCompositeOptions = {}): CentralCompositeDesign {
  factors.forEach((f, i) => {
    if (f.kind !== 'continuous') {
      throw new DomainError(
        'unsupported',
        `a central composite design needs continuous factors; ${f.name} is ${f.kind} (use an optimal design for mixed factors)`,
        `factors[${i}].kind`,
      );
    }
  });
  const k = factors.length;
  if (k < 2) throw invalidInput('factors', 'a central composite design needs at least two factors');
  if (k > 8) throw invalidInput('factors', 'a central composite design here takes at most eight factors; use an optimal design');
  const n0 = options.centerPoints ?? DEFAULT_CCD_CENTRE_RUNS;
  const replicates = options.replicates ?? 1;
  if (!Number.isInteger(n0) || n0 < 0) throw invalidInput('centerPoints', 'centerPoints must be a whole number of at least 0');
  if (!Number.isInteger(replicates) || replicates < 1) throw invalidInput('replicates', 'replicates must be a whole number of at least 1');
  const cube = standardOrder(factors.map(() => [-1, 1]));
  const f = cube.length;
  const choice = options.alpha ?? 'face-centred';
  let alpha: number;
  if (choice === 'face-centred') alpha = 1;
  else if (choice === 'rotatable') alpha = rotatableAlpha(f);
  else if (choice === 'orthogonal') alpha = orthogonalAlpha(f, k, n0);
  else if (typeof choice === 'number' && Number.isFinite(choice) && choice > 0) alpha = choice;
  else throw invalidInput('alpha', 'alpha must be "rotatable", "orthogonal", "face-centred" or a positive number');
  const runs: CodedRun[] = [];
  for (let r = 0; r < replicates; r++) {
    for (const row of cube) runs.push({ coded: row.slice() });
    for (let j = 0; j < k; j++) {
      for (const sign of [-1, 1]) {
        const coded = new Array<number>(k).fill(0);
        coded[j] = sign * alpha;
        runs.push({ coded });
      }
    }
  }
  runs.push(...centreRuns(factors, n0));
  return { runs, alpha, cubeRuns: f };
}
