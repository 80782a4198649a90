/**
 * Noisy Branin–Hoo (Surjanovic & Bingham's test-function library; constants from memory) with a failure
 * region: every trial with x1 > 6 and x2 < 6 "falls" (no response). The region holds one of the three
 * global minima, so a strategy that ignores failures keeps returning there.
 */
import { describe, expect, it } from 'vitest';
import { suggestTrials, type SuggestionDataRow } from '@/domain/surrogate';
import { randomNormal, seededRandom, shuffled } from '@/domain/random';
import type { Factor } from '@/domain/factors';

const BRANIN_MIN = 0.397887;
function branin(x1: number, x2: number): number {
  const b = 5.1 / (4 * Math.PI * Math.PI);
  const c = 5 / Math.PI;
  const t = 1 / (8 * Math.PI);
  return (x2 - b * x1 * x1 + c * x1 - 6) ** 2 + 10 * (1 - t) * Math.cos(x1) + 10;
}
const fails = (x1: number, x2: number) => x1 > 6 && x2 < 6;
const factors: Factor[] = [
  { name: 'x1', kind: 'continuous', low: -5, high: 10 },
  { name: 'x2', kind: 'continuous', low: 0, high: 15 },
];

function campaign(seed: number, aware: boolean) {
  const rng = seededRandom(seed);
  const n = 8;
  const cols = [0, 1].map(() => shuffled(Array.from({ length: n }, (_, i) => i), rng));
  const run = (x1: number, x2: number): SuggestionDataRow =>
    fails(x1, x2) ? { x1, x2, failed: true } : { x1, x2, y: branin(x1, x2) + randomNormal(rng) };
  const data: SuggestionDataRow[] = Array.from({ length: n }, (_, i) => run(-5 + (15 * (cols[0]![i]! + rng.next())) / n, (15 * (cols[1]![i]! + rng.next())) / n));
  let failures = 0;
  let lastBatchOutside = true;
  for (let r = 0; r < 8; r++) {
    const given = aware ? data : data.filter((d) => !d.failed);
    const knowsFailures = given.some((d) => d.failed);
    const { suggestions } = suggestTrials({ factors, data: given, response: 'y', goal: 'minimize', count: 2, seed: seed * 10 + r, feasibilityThreshold: 0.8 });
    for (const s of suggestions) {
      const x1 = s.values.x1 as number;
      const x2 = s.values.x2 as number;
      if (fails(x1, x2)) failures++;
      if (r === 7) lastBatchOutside &&= !fails(x1, x2);
      if (knowsFailures) expect(s.feasibility! >= 0.8 || /No setting reaches/.test(s.reason), s.reason).toBe(true);
      data.push(run(x1, x2));
    }
  }
  const best = Math.min(...data.filter((d) => !d.failed).map((d) => branin(d.x1 as number, d.x2 as number)));
  return { failures, lastBatchOutside, regret: best - BRANIN_MIN };
}

describe('noisy Branin–Hoo with a failure region (noise sd 1)', () => {
  it('learns the region from failed trials and avoids it, still finding a minimum outside it', () => {
    for (const seed of [1, 2, 3]) {
      const aware = campaign(seed, true);
      const blind = campaign(seed, false);
      expect(aware.failures).toBeLessThanOrEqual(3);
      expect(aware.failures).toBeLessThan(blind.failures);
      expect(aware.lastBatchOutside).toBe(true);
      expect(aware.regret).toBeLessThan(1);
    }
  });
});
