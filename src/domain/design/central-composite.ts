/** Central composite designs: a two-level cube, axial (star) points at ±α and centre runs. */
// Box & Wilson (1951), J. R. Statist. Soc. B 13:1-45 (central composite design)
import { DomainError, invalidInput } from '../errors';
import type { Factor } from '../factors';
import { chooseFraction, fractionRuns } from './fractional-factorial';
import { centreRuns } from './full-factorial';
import { blockTwoLevel, powerOf, type FactorialBlocking } from './blocking';
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

/**
 * α for orthogonal blocking: each cube block (F_b cube runs and n0c centre runs, F_b = F / cube
 * blocks) and the axial block (2k axial runs and n0a centre runs) carry the same share of Σx_i²
 * per run, F_b / (F_b + n0c) = 2α² / (2k + n0a), so α = √(F_b (2k + n0a) / (2 (F_b + n0c))). With r
 * replicates of the cube and axial runs in the same blocks, α = √(F_b (2kr + n0a) / (2 (r F_b + n0c))).
 */
// Box & Hunter (1957), Ann. Math. Statist. 28:195-241 (orthogonal blocking of composite designs)
export function orthogonalBlockingAlpha(cubeRunsPerBlock: number, factorCount: number, cubeCentres: number, axialCentres: number, replicates = 1): number {
  const fb = cubeRunsPerBlock;
  const r = replicates;
  return Math.sqrt((fb * (2 * factorCount * r + axialCentres)) / (2 * (r * fb + cubeCentres)));
}

export interface CentralCompositeOptions {
  alpha?: AxialDistance;
  /** Centre runs; with two blocks, centre runs in each block. */
  centerPoints?: number;
  replicates?: number;
  /** Resolution of the cube fraction (default: full cube up to 4 factors, else the smallest resolution V fraction). */
  resolution?: number;
  /**
   * 1 (default); 2: the cube and the axial runs as two blocks; 1 + 2^q (3, 5, 9 …): the cube split
   * into 2^q blocks by confounding high-order interactions, and the axial runs in a block of their own.
   */
  blocks?: number;
}

export interface CentralCompositeDesign {
  runs: CodedRun[];
  alpha: number;
  cubeRuns: number;
  /** How the cube was split, when it was (3 or more blocks). */
  blocking?: FactorialBlocking;
  /** Blocked designs: the α that makes the blocks orthogonal to the quadratic model. */
  blockingAlpha?: number;
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
  const blocks = options.blocks ?? 1;
  if (!Number.isInteger(blocks) || blocks < 1 || (blocks > 2 && powerOf(blocks - 1, 2) === null)) {
    throw invalidInput('blocks', 'a central composite design has 1 block, 2 (cube and axial runs), or 1 + 2, 4, 8 … (the cube split into 2, 4, 8 … blocks and the axial runs in one)');
  }
  const cubeBlocks = Math.max(1, blocks - 1);
  if (blocks >= 2 && n0 < 1) {
    // Without centre runs Σ x_i² is the same on every axial run, so the squares are confounded with the axial block.
    throw invalidInput('centerPoints', 'a blocked central composite design needs at least one centre run in each block to estimate the squared terms; set centerPoints to 1 or more');
  }
  const resolution = options.resolution ?? (k <= 4 ? k + 1 : 5);
  if (!Number.isInteger(resolution) || (resolution <= k && resolution < 5)) {
    throw invalidInput('resolution', 'the cube of a central composite design needs resolution V or more to estimate the two-factor interactions');
  }
  const generators = resolution > k ? [] : chooseFraction(k, resolution);
  const cube = fractionRuns(k, generators);
  const f = cube.length;
  // Cube blocks keep every main effect and two-factor interaction clear of blocks (the quadratic model needs them).
  let blocking: FactorialBlocking | undefined;
  if (cubeBlocks > 1) {
    try {
      blocking = blockTwoLevel(k, generators, cubeBlocks, 2, factors.map((x) => x.name), 'the quadratic model needs them clear');
    } catch (e) {
      if (!(e instanceof DomainError) || e.field !== 'blocks') throw e;
      throw new DomainError(
        'unsupported',
        `blocks ${blocks} puts the ${f}-run cube in ${cubeBlocks} blocks: ${e.message}; ask for fewer blocks${resolution <= k ? ', or a larger cube (higher resolution)' : ''}`,
        'blocks',
        e.details,
      );
    }
  }
  const choice = options.alpha ?? (blocks >= 2 ? 'orthogonal' : 'face-centred');
  let alpha: number;
  if (blocks >= 2 && choice === 'orthogonal') alpha = orthogonalBlockingAlpha(f / cubeBlocks, k, n0, n0, replicates);
  else if (choice === 'face-centred') alpha = 1;
  else if (choice === 'rotatable') alpha = rotatableAlpha(f);
  else if (choice === 'orthogonal') alpha = orthogonalAlpha(f, k, n0);
  else if (typeof choice === 'number' && Number.isFinite(choice) && choice > 0) alpha = choice;
  else throw invalidInput('alpha', 'alpha must be "rotatable", "orthogonal", "face-centred" or a positive number');
  const runs: CodedRun[] = [];
  const cubeBlock = (row: readonly number[]) => (blocking ? blocking.blockOf(row) : blocks === 2 ? 1 : undefined);
  const axialBlock = blocks >= 2 ? blocks : undefined;
  const tag = (run: CodedRun, block: number | undefined): CodedRun => (block === undefined ? run : { ...run, block });
  for (let r = 0; r < replicates; r++) {
    for (const row of cube) runs.push(tag({ coded: row.slice() }, cubeBlock(row)));
    for (let j = 0; j < k; j++) {
      for (const sign of [-1, 1]) {
        const coded = new Array<number>(k).fill(0);
        coded[j] = sign * alpha;
        runs.push(tag({ coded }, axialBlock));
      }
    }
  }
  if (blocks >= 2) {
    for (let b = 1; b <= blocks; b++) runs.push(...centreRuns(factors, n0).map((c) => tag(c, b)));
  } else {
    runs.push(...centreRuns(factors, n0));
  }
  return {
    runs,
    alpha,
    cubeRuns: f,
    ...(blocking ? { blocking } : {}),
    ...(blocks >= 2 ? { blockingAlpha: orthogonalBlockingAlpha(f / cubeBlocks, k, n0, n0, replicates) } : {}),
  };
}
