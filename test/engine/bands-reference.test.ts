import fc from 'fast-check';
import { quantileSorted } from 'd3-array';
import { describe, expect, it } from 'vitest';
import { orderStatistics, type7Quantiles } from '../../scripts/bands-reference.js';

/** min and max as the callers find them (with `<` and `>`). */
function extremes(xs: Float64Array): [number, number] {
  let min = Infinity;
  let max = -Infinity;
  for (const x of xs) { if (x < min) min = x; if (x > max) max = x; }
  return [min, max];
}

// −0 is mapped to 0 throughout: a sort orders −0 before 0 while selection and bucket counting treat
// them as equal, so the two may return zeros of different sign — the same number for every purpose here.
const finite = fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x + 0);
const share = fc.double({ min: 0, max: 1, noNaN: true }).map((x) => x + 0);
const extreme = fc.constantFrom(0, 1, Number.MAX_VALUE, -Number.MAX_VALUE, Number.MIN_VALUE, -Number.MIN_VALUE,
  Infinity, -Infinity, 1e-300, 0.5, 1 - 2 ** -53);
/** Columns built to crowd: a few distinct values, near-ties a few ulps apart, and stray extremes. */
const column = fc.oneof(
  fc.array(share, { minLength: 1, maxLength: 3000, size: 'max' }),
  fc.array(fc.constantFrom(0, 0.25, 0.5, 1), { minLength: 1, maxLength: 3000, size: 'max' }),
  fc.array(fc.integer({ min: 0, max: 5 }).map((u) => 0.3 + u * 2 ** -54), { minLength: 1, maxLength: 3000, size: 'max' }),
  fc.array(fc.oneof({ weight: 20, arbitrary: share }, { weight: 1, arbitrary: extreme }), { minLength: 1, maxLength: 3000, size: 'max' }),
  fc.array(fc.oneof(finite, extreme), { minLength: 1, maxLength: 500, size: 'max' }),
  fc.array(fc.integer({ min: 0, max: 1074 }).map((e) => 2 ** -e), { minLength: 1, maxLength: 3000, size: 'max' }),
);

describe('order statistics by bucket counting', () => {
  it('equal the sorted column at every wanted rank, without reordering the column (property)', () => {
    fc.assert(fc.property(column, fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 8 }), (xs, us) => {
      const values = Float64Array.from(xs);
      const before = values.slice();
      const sorted = values.slice().sort();
      const ranks = [...new Set(us.map((u) => Math.min(values.length - 1, Math.floor(u * values.length))))].sort((a, b) => a - b);
      const [min, max] = extremes(values);
      expect(orderStatistics(values, ranks, min, max)).toEqual(ranks.map((r) => sorted[r]));
      expect(values).toEqual(before);
    }), { numRuns: 600 });
  });

  it('finds every rank of 100,000 draws piled near one value, with a few far away (crowded buckets)', () => {
    // 99.9% of the values within 1e-9 of 0.2 and the rest at 0 or 1: the first round puts nearly all
    // in one bucket, so the search goes through further rounds; every 997th rank checked against a sort.
    let state = 1;
    const next = (): number => { state = (Math.imul(state, 48271) >>> 0) % 2147483647; return state / 2147483647; };
    const values = Float64Array.from({ length: 100_000 }, (_, i) => (i % 1000 === 0 ? (i % 2000 === 0 ? 0 : 1) : 0.2 + next() * 1e-9));
    const sorted = values.slice().sort();
    const ranks = Array.from({ length: 101 }, (_, i) => i * 997);
    const [min, max] = extremes(values);
    expect(orderStatistics(values, ranks, min, max)).toEqual(ranks.map((r) => sorted[r]));
  });
});

describe('type-7 quantiles', () => {
  it('equal d3-array quantileSorted on the sorted column exactly, at any probabilities, 0 and 1 included (property)', () => {
    const probability = fc.oneof(fc.double({ min: 0, max: 1, noNaN: true }), fc.constantFrom(0, 0.5, 1, 0.05, 0.95));
    fc.assert(fc.property(column, fc.array(probability, { minLength: 1, maxLength: 5 }), (xs, ps) => {
      const values = Float64Array.from(xs);
      const sorted = values.slice().sort() as unknown as number[];
      const [min, max] = extremes(values);
      const got = type7Quantiles(values, ps, min, max);
      // toBe is Object.is: NaN (d3's answer where ±Infinity meet) must be NaN here too.
      ps.forEach((p, i) => expect(got[i]).toBe(quantileSorted(sorted, p)));
    }), { numRuns: 600 });
  });

  it('handle n = 1, 2, 3 and all-equal columns', () => {
    const check = (xs: number[], ps: number[]): void => {
      const values = Float64Array.from(xs);
      const sorted = values.slice().sort() as unknown as number[];
      const [min, max] = extremes(values);
      const got = type7Quantiles(values, ps, min, max);
      ps.forEach((p, i) => expect(got[i]).toBe(quantileSorted(sorted, p)));
    };
    const ps = [0, 0.05, 0.25, 0.5, 0.75, 0.95, 1];
    check([0.4], ps);
    check([0.7, 0.1], ps);
    check([0.7, 0.1, 0.4], ps);
    check([1, 0, 1], ps);
    check(new Array<number>(5000).fill(0.3), ps);
    check(new Array<number>(3).fill(1), ps);
    expect(type7Quantiles(Float64Array.from([0.7, 0.1]), [0.5], 0.1, 0.7)).toEqual([0.4]);
  });

  it('refuse an empty sample', () => {
    expect(() => type7Quantiles(new Float64Array(0), [0.5], Infinity, -Infinity)).toThrow();
  });
});
