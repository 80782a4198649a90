/**
 * Run order from a seed. Complete randomisation when runs have no grouping; restricted
 * randomisation otherwise: blocks keep their order with runs shuffled inside each block, and whole
 * plots are shuffled (within their block) with runs shuffled inside each whole plot.
 */
// Fisher (1935), The Design of Experiments (randomisation); Goos & Vandebroek (2003), Technometrics 45:20-32 (split-plot run order)
import { shuffled, type RandomSource } from '../random';
import type { CodedRun } from './types';

export function randomiseRunOrder(runs: readonly CodedRun[], rng: RandomSource): CodedRun[] {
  const hasWholePlots = runs.some((r) => r.wholePlot !== undefined);
  const hasBlocks = runs.some((r) => r.block !== undefined);
  if (!hasWholePlots && !hasBlocks) return shuffled(runs, rng);
  const blockIds = [...new Set(runs.map((r) => r.block ?? 0))].sort((a, b) => a - b);
  const out: CodedRun[] = [];
  for (const b of blockIds) {
    const inBlock = runs.filter((r) => (r.block ?? 0) === b);
    if (!hasWholePlots) {
      out.push(...shuffled(inBlock, rng));
      continue;
    }
    const plotIds = [...new Set(inBlock.map((r) => r.wholePlot ?? -1))].sort((a, c) => a - c);
    for (const w of shuffled(plotIds, rng)) out.push(...shuffled(inBlock.filter((r) => (r.wholePlot ?? -1) === w), rng));
  }
  return out;
}
