import type { BenchCase } from '../types';
import type { Factor } from '../../src/domain/factors';
import { generateDesign, type DesignResult } from '../../src/domain/design';

const sixContinuous: Factor[] = Array.from({ length: 6 }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous', low: -1, high: 1 }));

const eightContinuous: Factor[] = Array.from({ length: 8 }, (_, i) => ({ name: `x${i + 1}`, kind: 'continuous', low: -1, high: 1 }));

const splitPlotFactors: Factor[] = [
  { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass', 'soil'], hardToChange: true },
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'continuous', low: 10, high: 30 },
  { name: 'stiffness', kind: 'continuous', low: 50, high: 150, unit: 'N/m' },
];

// CPU seconds of each run beside the wall-clock median: on a shared machine the wall clock also
// counts time spent waiting for a core.
const cpuSeconds = new Map<string, number[]>();
function timed(name: string, work: () => DesignResult): () => DesignResult {
  return () => {
    const start = process.cpuUsage();
    const result = work();
    const used = process.cpuUsage(start);
    const list = cpuSeconds.get(name) ?? [];
    list.push((used.user + used.system) / 1e6);
    cpuSeconds.set(name, list);
    return result;
  };
}
const reportFor = (name: string) => (_: unknown, last: unknown) => {
  const d = last as DesignResult;
  const cpu = (cpuSeconds.get(name) ?? []).slice().sort((a, b) => a - b);
  return {
    cpuMedianSeconds: cpu.length ? cpu[cpu.length >> 1]! : NaN,
    dEfficiency: d.diagnostics.dEfficiency,
    criterion: d.diagnostics.optimal?.value ?? NaN,
    starts: d.diagnostics.optimal?.startsCompleted ?? 0,
  };
};

export const cases: BenchCase[] = [
  {
    name: 'design: D-optimal, 6 factors, quadratic, 40 runs, 100 starts',
    target: '≤ 1 s',
    targetSeconds: 1,
    run: timed('d6', () => generateDesign({ factors: sixContinuous, method: 'optimal', model: 'quadratic', runs: 40, starts: 100, seed: 1 })),
    warmup: 1,
    repeats: 5,
    report: reportFor('d6'),
  },
  {
    name: 'design: split-plot, 4-level surface whole plots + 3 continuous, quadratic, 30 runs (8 whole plots, 20 starts)',
    target: '≤ 2 s',
    targetSeconds: 2,
    run: timed('split', () => generateDesign({ factors: splitPlotFactors, method: 'optimal', model: 'quadratic', runs: 30, wholePlots: 8, starts: 20, seed: 1 })),
    warmup: 1,
    repeats: 5,
    report: reportFor('split'),
  },
  {
    name: 'design: I-optimal, 6 factors, quadratic, 40 runs, 20 starts',
    run: timed('i6', () => generateDesign({ factors: sixContinuous, method: 'optimal', model: 'quadratic', runs: 40, starts: 20, criterion: 'I', seed: 1 })),
    warmup: 1,
    repeats: 3,
    report: reportFor('i6'),
  },
  {
    // No stated target: how long choosing block generators and the blocked diagnostics take.
    name: 'design: 2^8 full factorial in 16 blocks, interactions model (block generators by search)',
    run: timed('blk8', () => generateDesign({ factors: eightContinuous, method: 'full-factorial', model: 'interactions', blocks: 16, seed: 1 })),
    warmup: 1,
    repeats: 3,
    report: (_: unknown, last: unknown) => {
      const d = last as DesignResult;
      return { blocks: d.diagnostics.blocking?.blocks ?? 0, orthogonal: String(d.diagnostics.blocking?.orthogonal), shortestConfounded: Math.min(...(d.diagnostics.blocking?.confounded ?? []).map((c) => c.effect.split('*').length)) };
    },
  },
  {
    name: 'design: central composite, 6 factors, half-fraction cube in 2 blocks + axial block',
    run: timed('ccd6', () => generateDesign({ factors: sixContinuous, method: 'central-composite', blocks: 3, centerPoints: 2, seed: 1 })),
    warmup: 1,
    repeats: 3,
    report: (_: unknown, last: unknown) => {
      const d = last as DesignResult;
      return { alpha: d.diagnostics.axialDistance ?? NaN, orthogonal: String(d.diagnostics.blocking?.orthogonal) };
    },
  },
];
