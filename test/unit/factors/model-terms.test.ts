import { describe, expect, it } from 'vitest';
import { codePoint, compileModel, decodePoint, parseTerm, standardTerms, type Factor } from '@/domain/factors';

const factors: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'discrete', values: [10, 20, 30] },
  { name: 'surface', kind: 'categorical', levels: ['turf', 'glass', 'sand'], hardToChange: true },
];

describe('model terms', () => {
  it('codes natural values onto [-1, 1] and back', () => {
    const c = codePoint(factors, { payload: 1.5, gain: 30, surface: 'sand' });
    expect(c).toEqual([0.5, 1, 2]);
    expect(decodePoint(factors, c)).toEqual({ payload: 1.5, gain: 30, surface: 'sand' });
  });

  it('builds quadratic model rows with effect-coded categorical columns', () => {
    const model = compileModel(factors, standardTerms(factors, 'quadratic'));
    expect(model.labels).toEqual([
      '(Intercept)', 'payload', 'gain', 'surface[turf]', 'surface[glass]',
      'payload*gain', 'payload*surface[turf]', 'payload*surface[glass]', 'gain*surface[turf]', 'gain*surface[glass]',
      'payload^2', 'gain^2',
    ]);
    const row = Array.from(model.row([0.5, -1, 2]));
    expect(row).toEqual([1, 0.5, -1, -1, -1, -0.5, -0.5, -0.5, 1, 1, 0.25, 1]);
  });

  it('parses powers and products and names unknown factors', () => {
    expect(parseTerm('gain^10').parts).toEqual([{ name: 'gain', power: 10 }]);
    expect(parseTerm('payload*payload').label).toBe('payload^2');
    expect(() => parseTerm('speed', factors)).toThrow(/speed/);
  });
});
