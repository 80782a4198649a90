import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { medianOfRange } from '@/domain/tracks/select';

describe('median by selection (Hoare 1961)', () => {
  it('equals the median from a full sort, for any range', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 300 }), fc.nat(), fc.nat(), (xs, a, b) => {
        const values = Float64Array.from(xs);
        const from = a % xs.length;
        const to = from + 1 + (b % (xs.length - from));
        const sorted = xs.slice(from, to).sort((p, q) => p - q);
        const m = sorted.length >> 1;
        const expected = sorted.length % 2 ? sorted[m]! : (sorted[m - 1]! + sorted[m]!) / 2;
        expect(medianOfRange(values, from, to)).toBe(expected);
        expect(Array.from(values)).toEqual(xs);
      }),
      { numRuns: 500, seed: 20260304 },
    );
  });
  it('handles ties and an empty range', () => {
    expect(medianOfRange(Float64Array.of(2, 2, 2, 1), 0, 4)).toBe(2);
    expect(medianOfRange(Float64Array.of(1), 0, 0)).toBeNaN();
  });
});
