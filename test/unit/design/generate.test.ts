import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { standardTerms, type Factor } from '@/domain/factors';
import {
  designDiagnostics,
  fullFactorialDesign,
  generateDesign,
  nextRunByPredictionVariance,
  type DesignResult,
} from '@/domain/design';

const three: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'continuous', low: 10, high: 30 },
  { name: 'stiffness', kind: 'continuous', low: 50, high: 150, unit: 'N/m' },
];

const mixed: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'legs', kind: 'discrete', values: [1, 2, 4] },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'ice', 'glass'], hardToChange: true },
];

function key(values: Record<string, unknown>): string {
  return JSON.stringify(values);
}

function catchError(fn: () => unknown): DomainError {
  try {
    fn();
  } catch (e) {
    if (e instanceof DomainError) return e;
    throw e;
  }
  throw new Error('expected a DomainError');
}

describe('full factorial', () => {
  it('runs every combination of two levels once, orthogonally (2^3)', () => {
    const d = generateDesign({ factors: three, method: 'full-factorial', seed: 7 });
    expect(d.runs).toHaveLength(8);
    expect(new Set(d.runs.map((r) => key(r.values))).size).toBe(8);
    for (const r of d.runs) {
      expect(r.coded.every((c) => c === -1 || c === 1)).toBe(true);
      expect([0, 2]).toContain(r.values.payload);
    }
    expect(d.model).toBe('interactions');
    expect(d.terms).toEqual(['(Intercept)', 'payload', 'gain', 'stiffness', 'payload*gain', 'payload*stiffness', 'gain*stiffness']);
    // X'X = n I for the interactions model of a 2^k design: D- and A-efficiency are exactly 1.
    expect(d.diagnostics.dEfficiency).toBeCloseTo(1, 12);
    expect(d.diagnostics.aEfficiency).toBeCloseTo(1, 12);
    expect(d.diagnostics.errorDegreesOfFreedom).toBe(1);
  });

  it('crosses mixed levels: continuous × discrete × categorical, balanced', () => {
    const d = generateDesign({ factors: mixed, method: 'full-factorial', model: 'main-effects', seed: 3 });
    expect(d.runs).toHaveLength(2 * 3 * 3);
    expect(new Set(d.runs.map((r) => key(r.values))).size).toBe(18);
    for (const lv of ['turf', 'ice', 'glass']) expect(d.runs.filter((r) => r.values.surface === lv)).toHaveLength(6);
    for (const v of [1, 2, 4]) expect(d.runs.filter((r) => r.values.legs === v)).toHaveLength(6);
    expect(d.diagnostics.parameters).toBe(1 + 1 + 1 + 2);
  });

  it('puts continuous factors at three levels for a quadratic model, with replicates and centre runs', () => {
    const d = generateDesign({ factors: three.slice(0, 2), method: 'full-factorial', model: 'quadratic', replicates: 2, centerPoints: 2 });
    expect(d.runs).toHaveLength(9 * 2 + 2);
    expect(new Set(d.runs.map((r) => r.values.payload))).toEqual(new Set([0, 1, 2]));
    expect(d.runs.filter((r) => r.values.payload === 1 && r.values.gain === 20)).toHaveLength(2 + 2);
  });

  it('places centre runs of a mixed design across the categorical levels', () => {
    const runs = fullFactorialDesign(mixed, { centerPoints: 3 });
    const centres = runs.slice(-3);
    expect(centres.map((r) => r.coded[2])).toEqual([0, 1, 2]);
    // The discrete factor's centre is its allowed value nearest the middle of its range (2.5 → 2).
    expect(centres.every((r) => r.coded[0] === 0 && Math.abs(r.coded[1]! - (-1 / 3)) < 1e-12)).toBe(true);
  });
});

describe('face-centred central composite design', () => {
  it('has 2^k cube runs, 2k axial runs on the faces and the centre runs', () => {
    const d = generateDesign({ factors: three, method: 'central-composite', alpha: 'face-centred', centerPoints: 3, seed: 11 });
    expect(d.runs).toHaveLength(8 + 6 + 3);
    expect(d.model).toBe('quadratic');
    const axial = d.runs.filter((r) => r.coded.filter((c) => c === 0).length === 2);
    expect(axial).toHaveLength(6);
    for (const r of d.runs) {
      expect(r.values.payload as number).toBeGreaterThanOrEqual(0);
      expect(r.values.payload as number).toBeLessThanOrEqual(2);
    }
    expect(d.runs.filter((r) => r.coded.every((c) => c === 0))).toHaveLength(3);
    expect(d.diagnostics.parameters).toBe(10);
    expect(d.diagnostics.notes).toEqual([]);
  });

  it('takes axial runs beyond the range for a rotatable α and says so', () => {
    const d = generateDesign({ factors: three.slice(0, 2), method: 'central-composite', alpha: 'rotatable', centerPoints: 5 });
    expect(d.runs).toHaveLength(13);
    const maxPayload = Math.max(...d.runs.map((r) => r.values.payload as number));
    expect(maxPayload).toBeCloseTo(1 + Math.SQRT2, 10);
    expect(d.diagnostics.notes[0]).toMatch(/beyond the factor ranges/);
  });

  it('refuses categorical factors with a typed error naming the field', () => {
    const e = catchError(() => generateDesign({ factors: mixed, method: 'central-composite' }));
    expect(e.code).toBe('unsupported');
    expect(e.field).toBe('factors[1].kind');
  });
});

describe('seeded randomisation', () => {
  it('gives the same design for the same seed, byte for byte', () => {
    const a = generateDesign({ factors: mixed, method: 'full-factorial', seed: 42 });
    const b = generateDesign({ factors: mixed, method: 'full-factorial', seed: 42 });
    expect(JSON.stringify(a)).toBe(JSON.stringify(b));
    const c = generateDesign({ factors: mixed, method: 'full-factorial', seed: 43 });
    expect(c.runs.map((r) => key(r.values))).not.toEqual(a.runs.map((r) => key(r.values)));
  });

  it('only permutes the runs: any seed gives the same multiset of runs, numbered 1..n', () => {
    const sorted = (d: DesignResult) => d.runs.map((r) => key(r.values)).sort();
    const reference = sorted(generateDesign({ factors: three, method: 'central-composite', seed: 1 }));
    fc.assert(
      fc.property(fc.integer({ min: -1_000_000, max: 1_000_000 }), (seed) => {
        const d = generateDesign({ factors: three, method: 'central-composite', seed });
        expect(sorted(d)).toEqual(reference);
        expect(d.runs.map((r) => r.order)).toEqual(d.runs.map((_, i) => i + 1));
      }),
      { numRuns: 12 },
    );
  });

  it('puts existing runs first, flagged, and keeps them out of the shuffle', () => {
    const existingRuns = [
      { payload: 0.5, gain: 12, stiffness: 60 },
      { payload: 1.5, gain: 28, stiffness: 140 },
    ];
    const d = generateDesign({ factors: three, method: 'full-factorial', existingRuns, seed: 5 });
    expect(d.runs).toHaveLength(10);
    expect(d.runs.slice(0, 2).map((r) => r.values)).toEqual(existingRuns);
    expect(d.runs.slice(0, 2).every((r) => r.existing === true)).toBe(true);
    expect(d.runs.slice(2).every((r) => r.existing === undefined)).toBe(true);
    expect(d.runs[0]!.coded).toEqual([-0.5, -0.8, -0.8]);
  });
});

describe('rank check and refusals', () => {
  it('refuses a singular design and names the terms that cannot be estimated', () => {
    const terms = standardTerms(three.slice(0, 2), 'quadratic');
    const twoLevel = fullFactorialDesign(three.slice(0, 2)).map((r) => r.coded);
    const e = catchError(() => designDiagnostics(three.slice(0, 2), terms, twoLevel));
    expect(e.code).toBe('singular_design');
    // 4 runs for 6 parameters; the squares duplicate the intercept on a two-level design.
    expect((e.details as { inestimable: string[] }).inestimable).toEqual(['payload^2', 'gain^2']);
  });

  it('refuses runs that break a constraint instead of silently dropping them', () => {
    const e = catchError(() =>
      generateDesign({ factors: three, method: 'full-factorial', constraints: [{ terms: { payload: 1, gain: 0.02 }, max: 2.4 }] }),
    );
    expect(e.code).toBe('infeasible');
    expect(e.field).toBe('constraints');
  });

  it('names bad fields', () => {
    expect(catchError(() => generateDesign({ factors: three, method: 'nope' as 'sobol' })).field).toBe('method');
    expect(catchError(() => generateDesign({ factors: three, method: 'full-factorial', replicates: 0 })).field).toBe('replicates');
    expect(catchError(() => generateDesign({ factors: three, method: 'central-composite', alpha: -1 })).field).toBe('alpha');
    expect(
      catchError(() => generateDesign({ factors: three, method: 'full-factorial', existingRuns: [{ payload: 1, gain: 'x', stiffness: 1 }] })).field,
    ).toBe('existingRuns[0].gain');
  });
});

describe('next run by prediction variance', () => {
  const one: Factor[] = [{ name: 'payload', kind: 'continuous', low: 0, high: 2 }];

  it('matches the closed form for a straight line through the two ends', () => {
    // X'X = diag(2, 2) in coded units, so x'(X'X)^-1 x = (1 + x^2) / 2, largest (= 1) at the ends.
    const r = nextRunByPredictionVariance(one, ['payload'], [{ payload: 0 }, { payload: 2 }]);
    expect(r.predictionVariance).toBeCloseTo(1, 12);
    expect(r.scaledPredictionVariance).toBeCloseTo(2, 12);
    expect(r.ridge).toBe(0);
    expect([0, 2]).toContain(r.values.payload);
  });

  it('goes where the runs have not been, and honours constraints', () => {
    const existing = [{ payload: 0 }, { payload: 0.5 }, { payload: 1 }];
    expect(nextRunByPredictionVariance(one, 'quadratic', existing).values.payload).toBe(2);
    const limited = nextRunByPredictionVariance(one, 'quadratic', existing, { constraints: [{ terms: { payload: 1 }, max: 1.6 }] });
    expect(limited.values.payload as number).toBeLessThanOrEqual(1.6);
    expect(limited.values.payload as number).toBeGreaterThan(1.5);
  });

  it('uses a tiny ridge when the existing runs cannot fit the model, and says so', () => {
    const r = nextRunByPredictionVariance(mixed, 'main-effects', [{ payload: 1, legs: 2, surface: 'turf' }], { seed: 9 });
    expect(r.ridge).toBeGreaterThan(0);
    expect(r.values.surface).not.toBe('turf');
  });

  it('never proposes a point outside the constraints (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 10_000 }), fc.double({ min: 0.5, max: 2.5, noNaN: true }), (seed, cap) => {
        const r = nextRunByPredictionVariance(three, 'interactions', [{ payload: 1, gain: 20, stiffness: 100 }], {
          seed,
          candidates: 300,
          constraints: [{ terms: { payload: 1, gain: 0.02 }, max: cap }],
        });
        expect((r.values.payload as number) + 0.02 * (r.values.gain as number)).toBeLessThanOrEqual(cap + 1e-9);
      }),
      { numRuns: 30 },
    );
  });
});
