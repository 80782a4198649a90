import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileModel, standardTerms, type Factor } from '@/domain/factors';
import { seededRandom } from '@/domain/random';
import { augmentDesign, codedRegion, fastModel, generateDesign, momentMatrix } from '@/domain/design';

const cont = (name: string, low = -1, high = 1): Factor => ({ name, kind: 'continuous', low, high });

function det(m: number[][]): number {
  const a = m.map((r) => r.slice());
  const n = a.length;
  let d = 1;
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let i = c + 1; i < n; i++) if (Math.abs(a[i]![c]!) > Math.abs(a[piv]![c]!)) piv = i;
    if (a[piv]![c] === 0) return 0;
    if (piv !== c) {
      [a[c], a[piv]] = [a[piv]!, a[c]!];
      d = -d;
    }
    d *= a[c]![c]!;
    for (let i = c + 1; i < n; i++) {
      const f = a[i]![c]! / a[c]![c]!;
      for (let j = c; j < n; j++) a[i]![j]! -= f * a[c]![j]!;
    }
  }
  return d;
}

function xtx(rows: number[][]): number[][] {
  const p = rows[0]!.length;
  return Array.from({ length: p }, (_, a) => Array.from({ length: p }, (_, b) => rows.reduce((s, r) => s + r[a]! * r[b]!, 0)));
}

describe('coordinate exchange: small cases checked by exhaustive search', () => {
  it('finds the D-optimal 4-run design for a 1-D quadratic (|X\'X| = 8, exhaustive over {-1, 0, 1})', () => {
    const d = generateDesign({ factors: [cont('x')], method: 'optimal', model: 'quadratic', runs: 4, seed: 3 });
    const rows = d.runs.map((r) => [1, r.coded[0]!, r.coded[0]! ** 2]);
    expect(det(xtx(rows))).toBeCloseTo(8, 9);
    expect(Math.exp(d.diagnostics.optimal!.value)).toBeCloseTo(8, 9);
  });

  it('finds the I-optimal 4-run design for a 1-D quadratic: {-1, 0, 0, 1} (exhaustive over {-1, 0, 1})', () => {
    const w = [
      [1, 0, 1 / 3],
      [0, 1 / 3, 0],
      [1 / 3, 0, 1 / 5],
    ];
    const iValue = (pts: number[]) => {
      const m = xtx(pts.map((x) => [1, x, x * x]));
      // trace(W M^-1) via solving M Y = W column by column (3 × 3, Cramer's rule).
      const dm = det(m);
      if (Math.abs(dm) < 1e-12) return Infinity;
      let tr = 0;
      for (let c = 0; c < 3; c++) {
        for (let r = 0; r < 3; r++) {
          const mr = m.map((row, i) => row.map((v, j) => (j === r ? w[i]![c]! : v)));
          if (r === c) tr += det(mr) / dm;
        }
      }
      return tr;
    };
    let best = Infinity;
    const levels = [-1, 0, 1];
    for (const a of levels) for (const b of levels) for (const c of levels) for (const e of levels) best = Math.min(best, iValue([a, b, c, e]));
    const d = generateDesign({ factors: [cont('x')], method: 'optimal', model: 'quadratic', runs: 4, criterion: 'I', seed: 5 });
    expect(d.diagnostics.optimal!.value).toBeCloseTo(best, 9);
    expect(d.runs.map((r) => r.coded[0]).sort()).toEqual([-1, 0, 0, 1]);
  });

  it('gives an orthogonal design (D-efficiency 1) for main effects of three factors in 8 runs', () => {
    const d = generateDesign({ factors: [cont('a'), cont('b'), cont('c')], method: 'optimal', runs: 8, seed: 1 });
    expect(d.diagnostics.dEfficiency).toBeCloseTo(1, 9);
  });
});

describe('coordinate exchange: mixed factors, constraints, blocks, whole plots', () => {
  const mixed: Factor[] = [
    { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
    { name: 'gain', kind: 'continuous', low: 10, high: 30 },
    { name: 'legs', kind: 'discrete', values: [1, 2, 4] },
    { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass', 'soil'], hardToChange: true },
  ];

  it('honours linear constraints and disallowed combinations in every run (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1_000_000 }), fc.double({ min: 0.7, max: 2.5, noNaN: true }), (seed, cap) => {
        const d = generateDesign({
          factors: mixed,
          method: 'optimal',
          model: 'interactions',
          runs: 24,
          starts: 2,
          seed,
          constraints: [{ terms: { payload: 1, gain: 0.02 }, max: cap }],
          disallowed: [{ levels: { surface: 'ice', legs: 1 } }],
        });
        for (const r of d.runs) {
          expect((r.values.payload as number) + 0.02 * (r.values.gain as number)).toBeLessThanOrEqual(cap + 1e-9);
          expect(r.values.surface === 'ice' && r.values.legs === 1).toBe(false);
          expect([1, 2, 4]).toContain(r.values.legs);
        }
      }),
      { numRuns: 8 },
    );
  });

  it('puts runs on the constraint boundary, not only on grid points', () => {
    const d = generateDesign({
      factors: [cont('payload', 0, 2), cont('gain', 10, 30)],
      method: 'optimal',
      model: 'main-effects',
      runs: 6,
      seed: 2,
      constraints: [{ terms: { payload: 1, gain: 0.02 }, max: 2.4 }],
    });
    const onBoundary = d.runs.filter((r) => Math.abs((r.values.payload as number) + 0.02 * (r.values.gain as number) - 2.4) < 1e-9);
    expect(onBoundary.length).toBeGreaterThan(0);
  });

  it('is reproducible from its seed', () => {
    const spec = { factors: mixed, method: 'optimal' as const, model: 'main-effects' as const, runs: 12, starts: 3, seed: 77 };
    expect(JSON.stringify(generateDesign(spec))).toBe(JSON.stringify(generateDesign(spec)));
  });

  it('assigns fixed blocks of equal size and adds block effects to the model of the diagnostics', () => {
    const d = generateDesign({ factors: mixed.slice(0, 3), method: 'optimal', model: 'main-effects', runs: 12, blocks: 3, seed: 4, starts: 4 });
    for (const b of [1, 2, 3]) expect(d.runs.filter((r) => r.block === b)).toHaveLength(4);
    expect(d.diagnostics.columns).toContain('Block[1]');
    // Blocks stay in order; runs are randomised within them.
    expect(d.runs.map((r) => r.block)).toEqual([...d.runs.map((r) => r.block)].sort());
  });

  it('holds hard-to-change factors constant within whole plots and keeps each plot together in the run order', () => {
    const d = generateDesign({ factors: mixed, method: 'optimal', model: 'main-effects', runs: 16, wholePlots: 4, seed: 6, starts: 4 });
    const plots = new Map<number, Set<unknown>>();
    for (const r of d.runs) {
      if (!plots.has(r.wholePlot!)) plots.set(r.wholePlot!, new Set());
      plots.get(r.wholePlot!)!.add(r.values.surface);
    }
    expect(plots.size).toBe(4);
    for (const s of plots.values()) expect(s.size).toBe(1);
    // Whole plots are contiguous in the run order.
    const sequence = d.runs.map((r) => r.wholePlot);
    const changes = sequence.filter((w, i) => i > 0 && w !== sequence[i - 1]).length;
    expect(changes).toBe(3);
    expect(d.diagnostics.optimal!.wholePlots).toBe(4);
    expect(d.diagnostics.optimal!.varianceRatio).toBe(1);
    // With correlated runs inside whole plots the generalised information is smaller than X'X.
    expect(d.diagnostics.optimal!.generalisedDEfficiency!).toBeGreaterThan(0);
    expect(d.diagnostics.optimal!.generalisedDEfficiency!).toBeLessThan(d.diagnostics.dEfficiency);
  });

  it('refuses whole plots without hard-to-change factors', () => {
    expect(() => generateDesign({ factors: mixed.slice(0, 3), method: 'optimal', runs: 12, wholePlots: 3 })).toThrow(/hard-to-change/);
  });
});

describe('augmentation, progress and stopping', () => {
  const two = [cont('payload', 0, 2), cont('gain', 10, 30)];

  it('keeps the runs already made first and unchanged, and adds runs that make the quadratic estimable', () => {
    const existingRuns = [
      { payload: 0, gain: 10 },
      { payload: 2, gain: 10 },
      { payload: 0, gain: 30 },
      { payload: 2, gain: 30 },
    ];
    const d = augmentDesign({ factors: two, method: 'full-factorial', model: 'quadratic', existingRuns, runs: 5, seed: 8 });
    expect(d.method).toBe('optimal');
    expect(d.runs).toHaveLength(9);
    expect(d.runs.slice(0, 4).map((r) => r.values)).toEqual(existingRuns);
    expect(d.runs.slice(0, 4).every((r) => r.existing)).toBe(true);
    expect(d.runs.slice(4).every((r) => !r.existing)).toBe(true);
    expect(d.diagnostics.rank).toBe(6);
  });

  it('reports progress after each start and stops when asked, keeping the best so far', () => {
    const seen: number[] = [];
    let calls = 0;
    const d = generateDesign(
      { factors: two, method: 'optimal', model: 'quadratic', runs: 8, starts: 10, seed: 1 },
      { onProgress: (f) => seen.push(f), shouldStop: () => calls++ >= 3 },
    );
    expect(d.diagnostics.optimal!.stopped).toBe(true);
    expect(d.diagnostics.optimal!.startsCompleted).toBeGreaterThanOrEqual(1);
    expect(d.diagnostics.optimal!.startsCompleted).toBeLessThan(10);
    expect(seen[0]).toBeCloseTo(0.1, 12);
    const all: number[] = [];
    generateDesign({ factors: two, method: 'optimal', model: 'quadratic', runs: 8, starts: 4, seed: 1 }, { onProgress: (f) => all.push(f) });
    expect(all).toEqual([0.25, 0.5, 0.75, 1]);
  });

  it('keeps logged values of runs already made as they are, even off the allowed values', () => {
    const factors: Factor[] = [cont('payload', 0, 2), { name: 'legs', kind: 'discrete', values: [2, 4, 6] }];
    const existingRuns = [
      { payload: 0.1, legs: 3 },
      { payload: 1.7, legs: 6 },
    ];
    const d = augmentDesign({ factors, method: 'optimal', model: 'main-effects', existingRuns, runs: 4, seed: 1, starts: 2 });
    expect(d.runs.slice(0, 2).map((r) => r.values)).toEqual(existingRuns);
    for (const r of d.runs.slice(2)) expect([2, 4, 6]).toContain(r.values.legs);
  });

  it('puts runs already made in a block of their own when the new runs are blocked', () => {
    const existingRuns = [
      { payload: 0, gain: 10 },
      { payload: 2, gain: 30 },
      { payload: 1, gain: 20 },
    ];
    const d = augmentDesign({ factors: two, method: 'optimal', model: 'main-effects', existingRuns, runs: 6, blocks: 2, seed: 2, starts: 3 });
    expect(d.runs.slice(0, 3).every((r) => r.existing && r.block === undefined)).toBe(true);
    expect(d.runs.slice(3).map((r) => r.block)).toEqual([1, 1, 1, 2, 2, 2]);
    expect(d.diagnostics.columns.filter((c) => c.startsWith('Block['))).toHaveLength(2);
  });

  it('refuses too few runs for the model, naming runs', () => {
    expect(() => generateDesign({ factors: two, method: 'optimal', model: 'quadratic', runs: 4 })).toThrow(/at least 6 runs/);
  });
});

describe('model rows and region moments', () => {
  const factors: Factor[] = [
    cont('a'),
    { name: 'legs', kind: 'discrete', values: [1, 2, 4] },
    { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass'] },
  ];

  it('fast rows equal the shared model rows (property)', () => {
    const terms = standardTerms(factors, 'quadratic');
    const slow = compileModel(factors, terms);
    const fast = fastModel(factors, terms);
    expect(fast.p).toBe(slow.p);
    fc.assert(
      fc.property(fc.double({ min: -1, max: 1, noNaN: true }), fc.constantFrom(-1, -1 / 3, 1), fc.integer({ min: 0, max: 2 }), (a, l, s) => {
        const x = [a, l, s];
        expect(Array.from(fast.row(x, new Float64Array(fast.p)))).toEqual(Array.from(slow.row(x)));
      }),
    );
  });

  it('gives the uniform moments of the cube exactly: E[x^2] = 1/3, E[x^4] = 1/5, E[x^2 y^2] = 1/9', () => {
    const two = [cont('x'), cont('y')];
    const terms = standardTerms(two, 'quadratic');
    const w = momentMatrix(codedRegion({ factors: two }), terms, seededRandom(1));
    const p = 6; // 1, x, y, xy, x^2, y^2
    expect(w[0 * p + 0]).toBeCloseTo(1, 14);
    expect(w[1 * p + 1]).toBeCloseTo(1 / 3, 14);
    expect(w[0 * p + 4]).toBeCloseTo(1 / 3, 14);
    expect(w[4 * p + 4]).toBeCloseTo(1 / 5, 14);
    expect(w[4 * p + 5]).toBeCloseTo(1 / 9, 14);
    expect(w[3 * p + 3]).toBeCloseTo(1 / 9, 14);
    expect(w[1 * p + 2]).toBeCloseTo(0, 14);
  });

  it('averages effect-coded columns over the levels exactly, and the Monte Carlo average agrees under a loose constraint', () => {
    const terms = standardTerms(factors, 'main-effects');
    const exact = momentMatrix(codedRegion({ factors }), terms, seededRandom(1));
    const p = 5; // 1, a, legs, surface[turf], surface[glass... ] effect columns
    // Effect coding over 3 equally likely levels: E[c1^2] = 2/3, E[c1 c2] = 1/3.
    expect(exact[3 * p + 3]).toBeCloseTo(2 / 3, 14);
    expect(exact[3 * p + 4]).toBeCloseTo(1 / 3, 14);
    const mc = momentMatrix(codedRegion({ factors, constraints: [{ terms: { a: 1 }, max: 10 }] }), terms, seededRandom(1), 20000);
    for (let i = 0; i < p * p; i++) expect(Math.abs(mc[i]! - exact[i]!)).toBeLessThan(0.03);
  });
});
