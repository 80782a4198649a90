/** From a design request to a coordinate-exchange problem: levels, blocks (fixed or random), whole plots, existing runs. */
// Goos & Vandebroek (2001), Comput. Statist. Data Anal. 37:433-453 (D-optimal designs with random block effects)
import { invalidInput } from '../errors';
import { standardTerms, type CategoricalFactor, type Factor, type ModelTerm, type StandardModel } from '../factors';
import { codedLevels } from './levels';
import { coordinateExchange, type OptimalSearchOptions, type OptimalSearchResult } from './optimal';
import { codedRegion } from './region';
import type { CodedRun, DesignSpec } from './types';

export interface OptimalDesignOptions extends OptimalSearchOptions {
  /** η = σ²(whole plot) / σ²(sub-plot) for split-plot designs (default 1). */
  varianceRatio?: number;
}

/** A name for the block pseudo-factor that no real factor uses. */
export function blockFactorName(factors: readonly Factor[]): string {
  let name = 'Block';
  while (factors.some((f) => f.name === name)) name += '_';
  return name;
}

export function blockFactor(factors: readonly Factor[], levels: number): CategoricalFactor {
  return { name: blockFactorName(factors), kind: 'categorical', levels: Array.from({ length: levels }, (_, i) => String(i)) };
}

/** Coordinate levels per factor: ±1 for linear terms, −1/0/+1 for squares, an 11-point grid for higher powers. */
export function exchangeLevels(factors: readonly Factor[], terms: readonly ModelTerm[]): number[][] {
  return factors.map((f) => {
    let maxPower = 1;
    for (const t of terms) for (const part of t.parts) if (part.name === f.name) maxPower = Math.max(maxPower, part.power);
    const grid = maxPower === 1 ? [-1, 1] : maxPower === 2 ? [-1, 0, 1] : Array.from({ length: 11 }, (_, i) => -1 + i / 5);
    return codedLevels(f, grid);
  });
}

/** Split n runs into g consecutive groups as equal as possible: group of run i. */
export function evenGroups(n: number, g: number): number[] {
  return Array.from({ length: n }, (_, i) => Math.floor((i * g) / n));
}

export interface OptimalDesignOutcome {
  runs: CodedRun[];
  search: OptimalSearchResult;
  terms: ModelTerm[];
  /** Factors of the diagnostics model (with the block pseudo-factor when blocked). */
  blockFactor?: CategoricalFactor;
  varianceRatio?: number;
}

export function optimalDesign(spec: DesignSpec, model: StandardModel, existingCoded: readonly number[][], options: OptimalDesignOptions = {}): OptimalDesignOutcome {
  const { factors } = spec;
  const terms = standardTerms(factors, model);
  const blocks = spec.blocks ?? 1;
  const wholePlots = spec.wholePlots;
  if (!Number.isInteger(blocks) || blocks < 1) throw invalidInput('blocks', 'blocks must be a whole number of at least 1');
  if (blocks > 1 && wholePlots !== undefined) throw invalidInput('blocks', 'blocks and whole plots together are not supported; use whole plots alone');
  const hardToChange = factors.map((f, j) => (f.hardToChange ? j : -1)).filter((j) => j >= 0);
  if (wholePlots !== undefined) {
    if (!Number.isInteger(wholePlots) || wholePlots < 2) throw invalidInput('wholePlots', 'wholePlots must be a whole number of at least 2');
    if (hardToChange.length === 0) throw invalidInput('wholePlots', 'mark the hard-to-change factors (hardToChange: true); they are set once per whole plot');
    if (hardToChange.length === factors.length) throw invalidInput('wholePlots', 'at least one factor must be easy to change for a split-plot design');
  }
  const eta = options.varianceRatio ?? 1;
  if (!(eta >= 0) || !Number.isFinite(eta)) throw invalidInput('varianceRatio', 'varianceRatio must be a number of at least 0');

  const effects = spec.blockEffects ?? 'fixed';
  if (effects !== 'fixed' && effects !== 'random') throw invalidInput('blockEffects', 'blockEffects must be "fixed" or "random"');
  const randomBlocks = blocks > 1 && effects === 'random';
  if (effects === 'random' && blocks < 2) throw invalidInput('blocks', 'random block effects need blocks of 2 or more');
  // Random blocks enter M through V = I + η Z Z' (as whole plots with no hard-to-change factor), not as model columns.
  const block = blocks > 1 && !randomBlocks ? blockFactor(factors, existingCoded.length > 0 ? blocks + 1 : blocks) : undefined;
  const allFactors = block ? [...factors, block] : factors.slice();
  const allTerms = block ? [...terms, { label: block.name, parts: [{ name: block.name, power: 1 }] }] : terms;
  const p = allTerms.reduce((acc, t) => acc + t.parts.reduce((m, part) => {
    const f = allFactors.find((x) => x.name === part.name)!;
    return m * (f.kind === 'categorical' ? f.levels.length - 1 : 1);
  }, 1), 0);
  const n = spec.runs ?? Math.max(p + 4 - existingCoded.length, 1);
  if (!Number.isInteger(n) || n < 1) throw invalidInput('runs', 'runs must be a whole number of at least 1');
  if (n + existingCoded.length < p) {
    throw invalidInput('runs', `the model has ${p} parameters; ask for at least ${p - existingCoded.length} runs`);
  }
  if (wholePlots !== undefined && wholePlots > n) throw invalidInput('wholePlots', `${wholePlots} whole plots need at least as many runs`);
  // Refuse searches far beyond interactive size (about 300 times the 6-factor, 40-run, 100-start case).
  const starts = options.starts ?? 20;
  if (starts * (n + existingCoded.length) * p * p > 1e9) {
    throw invalidInput('starts', `this search (${starts} starts, ${n} runs, ${p} parameters) is too large to run here; use fewer starts or runs`);
  }
  const region = codedRegion({ factors: allFactors, constraints: spec.constraints, disallowed: spec.disallowed });
  const offset = existingCoded.length > 0 && block ? 1 : 0;
  const blockOf = block ? evenGroups(n, blocks).map((b) => b + offset) : null;
  const plotOf = wholePlots !== undefined ? evenGroups(n, wholePlots) : randomBlocks ? evenGroups(n, blocks) : undefined;
  const existing = block ? existingCoded.map((c) => [...c, 0]) : existingCoded;
  const search = coordinateExchange(
    {
      factors: allFactors,
      terms: allTerms,
      region,
      runs: n,
      existing,
      levels: exchangeLevels(allFactors, allTerms),
      fixedFactors: block ? [allFactors.length - 1] : [],
      fixedValues: blockOf ? blockOf.map((b) => new Map([[allFactors.length - 1, b]])) : undefined,
      wholePlotFactors: plotOf ? (randomBlocks ? [] : hardToChange) : undefined,
      wholePlotOf: plotOf,
      varianceRatio: eta,
    },
    { ...options, criterion: spec.criterion ?? options.criterion ?? 'D', seed: spec.seed ?? options.seed },
  );
  const runs: CodedRun[] = search.coded.map((c, i) => {
    const run: CodedRun = { coded: c.slice(0, factors.length) };
    if (blockOf) run.block = blockOf[i]! + (offset ? 0 : 1);
    else if (randomBlocks) run.block = plotOf![i]! + 1;
    else if (plotOf) run.wholePlot = plotOf[i]! + 1;
    return run;
  });
  return { runs, search, terms, blockFactor: block, varianceRatio: plotOf ? eta : undefined };
}
