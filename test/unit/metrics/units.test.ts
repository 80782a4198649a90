import { describe, expect, it } from 'vitest';
import { conversionFactor, convertUnit } from '@/domain/metrics/units';

describe('unit conversion', () => {
  it('converts within a quantity', () => {
    expect(convertUnit(250, 'mm', 'm')).toBeCloseTo(0.25, 15);
    expect(convertUnit(1.2, 'g', 'mg')).toBeCloseTo(1200, 9);
    expect(convertUnit(2, 'mWh', 'J')).toBeCloseTo(7.2, 12);
    expect(convertUnit(180, 'deg', 'rad')).toBeCloseTo(Math.PI, 12);
    expect(convertUnit(50, '%', '1')).toBeCloseTo(0.5, 15);
    expect(conversionFactor('widgets', 'widgets')).toBe(1);
  });
  it('names the field and refuses unknown units and mixed quantities', () => {
    expect(() => convertUnit(1, 'furlong', 'm', 'payload')).toThrow(/payload: unknown unit 'furlong'/);
    expect(() => convertUnit(1, 'g', 'mm', 'payload')).toThrow(/mass.*length/);
    expect(() => convertUnit(1, 'g', 'stone', 'payload')).toThrow(/cannot convert/);
  });
});
