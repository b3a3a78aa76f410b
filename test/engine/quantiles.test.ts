import fc from 'fast-check';
import { quantileSorted } from 'd3-array';
import { describe, expect, it } from 'vitest';
import { bandOf, discreteBandOf } from '../../src/engine/quantiles.js';

describe('bands of draws', () => {
  it('equal d3-array quantileSorted (type 7) on the sorted sample exactly, ties and all (property)', () => {
    // −0 is mapped to 0: sorting orders −0 before 0 while selection treats them as equal, so the two
    // may return zeros of different sign — the same number for every purpose here.
    const values = fc.array(fc.oneof(fc.double({ min: -1, max: 1, noNaN: true }).map((x) => x + 0), fc.constantFrom(0, 0.5, 1)), { minLength: 1, maxLength: 300 });
    fc.assert(fc.property(values, fc.double({ min: 0.01, max: 0.99, noNaN: true }), (xs, level) => {
      const sorted = Float64Array.from(xs).sort() as unknown as number[];
      const tail = (1 - level) / 2;
      const band = bandOf(Float64Array.from(xs), level);
      expect(band.low).toBe(quantileSorted(sorted, tail));
      expect(band.median).toBe(quantileSorted(sorted, 0.5));
      expect(band.high).toBe(quantileSorted(sorted, 1 - tail));
    }), { numRuns: 2000 });
  });

  it('match R quantile(type = 7) on 1…10 (value from memory of R\'s definition: 1 + 9p)', () => {
    const band = bandOf(Float64Array.from([10, 3, 7, 1, 9, 2, 8, 4, 6, 5]), 0.9);
    expect(band.low).toBeCloseTo(1.45, 12);
    expect(band.median).toBeCloseTo(5.5, 12);
    expect(band.high).toBeCloseTo(9.55, 12);
    expect(band.mean).toBe(5.5);
  });

  it('keep whole numbers whole (type 1, inverse of the empirical distribution)', () => {
    expect(discreteBandOf(Int32Array.from([2030, 2031, 2032, 2033]), 0.5)).toEqual({ median: 2031, low: 2030, high: 2032 });
  });
});
