import { describe, expect, it } from 'vitest';
import { backwardReduction, boxCox } from '@/domain/analysis';

// Invented data; noise from a fixed formula so the test is deterministic.
const noise = (i: number) => Math.sin(12.9898 * (i + 1)) * 0.5;

describe('Box–Cox suggestion (Box & Cox 1964)', () => {
  const xs = Array.from({ length: 40 }, (_, i) => i / 39);
  it('suggests the log for multiplicative errors and no transform for additive ones', () => {
    const multiplicative = xs.map((x, i) => ({ x, y: Math.exp(1 + 2 * x + 0.3 * noise(i)) }));
    const bc = boxCox({ data: multiplicative, response: 'y', terms: ['x'] });
    expect(bc.interval[0]).toBeLessThan(0);
    expect(bc.interval[1]).toBeGreaterThan(0);
    expect(bc.suggested).toBe(0);
    expect(bc.transform).toBe('log y');
    const additive = xs.map((x, i) => ({ x, y: 50 + 20 * x + 2 * noise(i) }));
    expect(boxCox({ data: additive, response: 'y', terms: ['x'] }).suggested).toBe(1);
  });

  it('finds the maximum of the profile and is unchanged by rescaling the response', () => {
    const data = xs.map((x, i) => ({ x, y: (3 + 4 * x + 0.4 * noise(i)) ** 2 }));
    const bc = boxCox({ data, response: 'y', terms: ['x'] });
    for (const pt of bc.profile) expect(pt.logLikelihood).toBeLessThanOrEqual(bc.profile.reduce((m, q) => Math.max(m, q.logLikelihood), -Infinity));
    expect(bc.lambda).toBeGreaterThan(bc.interval[0]);
    expect(bc.lambda).toBeLessThan(bc.interval[1]);
    const scaled = boxCox({ data: data.map((d) => ({ ...d, y: d.y * 1000 })), response: 'y', terms: ['x'] });
    expect(scaled.lambda).toBeCloseTo(bc.lambda, 5);
    expect(bc.interval[0]).toBeLessThan(0.5);
    expect(bc.interval[1]).toBeGreaterThan(0.5);
    expect(() => boxCox({ data: [{ x: 1, y: -1 }, { x: 2, y: 3 }, { x: 3, y: 4 }], response: 'y', terms: ['x'] })).toThrow(/positive/);
  });
});

describe('backward reduction with hierarchy', () => {
  // Replicated 2^3: strong a, b and a*b; c and its interactions are noise.
  const data = Array.from({ length: 24 }, (_, i) => {
    const a = i & 1 ? 1 : -1;
    const b = i & 2 ? 1 : -1;
    const c = i & 4 ? 1 : -1;
    return { a, b, c, y: 10 + 3 * a + 2 * b + 1.5 * a * b + noise(i) };
  });

  it('drops noise terms, interactions before their parents, and keeps the active hierarchy', () => {
    const red = backwardReduction({ data, response: 'y', terms: ['a', 'b', 'c', 'a*b', 'a*c', 'b*c'] });
    expect(red.terms).toEqual(['a', 'b', 'a*b']);
    const order = red.steps.map((s) => s.removed);
    expect(order.indexOf('c')).toBeGreaterThan(Math.max(order.indexOf('a*c'), order.indexOf('b*c')));
    for (const s of red.steps) expect(s.p).toBeGreaterThan(0.05);
    expect(red.result.terms).toEqual(['a', 'b', 'a*b']);
  });

  it('keeps a main effect that a kept interaction contains, even when its own p is large', () => {
    const weakB = data.map((d, i) => ({ ...d, y: 10 + 3 * d.a + 2 * d.a * d.b + noise(i) }));
    const red = backwardReduction({ data: weakB, response: 'y', terms: ['a', 'b', 'a*b'] });
    expect(red.terms).toEqual(['a', 'b', 'a*b']);
  });
});
