import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bandsInto } from '../../src/engine/band-kernel.js';
import { bandOf } from '../../src/engine/quantiles.js';
import { bandOfReference } from '../../scripts/bands-reference.js';

/** [median, low, high, mean] by the JavaScript reference (bucket counting, Allison & Noga 1980). */
function reference(xs: Float64Array, level: number): number[] {
  const b = bandOfReference(xs, level);
  return [b.median, b.low, b.high, b.mean];
}

// Signed zeros are kept here (no `+ 0`): the kernel follows the reference step for step, so even the
// sign of a zero must agree (toBe is Object.is: −0 and +0 differ, every NaN is NaN).
const share = fc.double({ min: 0, max: 1, noNaN: true });
const finite = fc.double({ noNaN: true, noDefaultInfinity: true });
const extreme = fc.constantFrom(0, -0, 1, Number.MAX_VALUE, -Number.MAX_VALUE, Number.MIN_VALUE, -Number.MIN_VALUE,
  Infinity, -Infinity, 1e-300, 0.5, 1 - 2 ** -53);
const length = (max: number): { minLength: number; maxLength: number; size: 'max' } => ({ minLength: 1, maxLength: max, size: 'max' });
const column = fc.oneof(
  fc.array(share, length(3000)),
  fc.array(share, length(64)),
  fc.array(fc.constantFrom(0, -0, 0.25, 0.5, 1), length(3000)),
  fc.array(fc.constantFrom(0, -0), length(200)),
  // A tiny range: values a few ulps apart, and subnormals.
  fc.array(fc.integer({ min: 0, max: 5 }).map((u) => 0.3 + u * 2 ** -54), length(3000)),
  fc.array(fc.integer({ min: 0, max: 7 }).map((u) => u * Number.MIN_VALUE), length(500)),
  fc.array(fc.oneof({ weight: 20, arbitrary: share }, { weight: 1, arbitrary: extreme }), length(3000)),
  fc.array(fc.oneof(finite, extreme), length(500)),
  fc.array(fc.integer({ min: 0, max: 1074 }).map((e) => 2 ** -e), length(3000)),
);
const level = fc.oneof(fc.double({ min: 0.01, max: 0.99, noNaN: true }), fc.constantFrom(0.5, 0.8, 0.9, 0.95));

describe('the band kernel (WebAssembly)', () => {
  it('gives the JavaScript reference\'s median, low, high and mean, bit for bit (property)', () => {
    fc.assert(fc.property(column, level, (xs, lv) => {
      const values = Float64Array.from(xs);
      const before = values.slice();
      const b = bandOf(values, lv);
      const want = reference(values, lv);
      [b.median, b.low, b.high, b.mean].forEach((x, i) => expect(x).toBe(want[i]));
      expect(values).toEqual(before);
    }), { numRuns: 1000 });
  });

  it('gives each column of a call its own band, as one column at a time does (property)', () => {
    const columns = fc.integer({ min: 1, max: 300 }).chain((n) => fc.tuple(fc.constant(n),
      fc.array(fc.array(fc.oneof({ weight: 10, arbitrary: share }, { weight: 1, arbitrary: extreme }), { minLength: n, maxLength: n }), { minLength: 1, maxLength: 12 })));
    fc.assert(fc.property(columns, level, ([n, cols], lv) => {
      const data = Float64Array.from(cols.flat());
      const out = new Float64Array(2 + 4 * cols.length).fill(7);
      bandsInto(data, n, lv, out, 2);
      expect(out[0]).toBe(7);
      expect(out[1]).toBe(7);
      cols.forEach((c, i) => reference(Float64Array.from(c), lv).forEach((x, j) => expect(out[2 + 4 * i + j]).toBe(x)));
    }), { numRuns: 300 });
  });

  it('handles n = 1 and calls longer than one batch (2²⁰ doubles)', () => {
    const n = 3;
    const count = Math.floor(2 ** 20 / n) + 7;
    let state = 7;
    const next = (): number => { state = (Math.imul(state, 48271) >>> 0) % 2147483647; return state / 2147483647; };
    const data = Float64Array.from({ length: n * count }, next);
    const out = new Float64Array(4 * count);
    bandsInto(data, n, 0.9, out);
    for (let c = 0; c < count; c += c < count - 20 ? 997 : 1) {
      reference(data.subarray(c * n, (c + 1) * n), 0.9).forEach((x, j) => expect(out[4 * c + j]).toBe(x));
    }
    expect(bandOf(Float64Array.of(0.25), 0.9)).toEqual({ median: 0.25, low: 0.25, high: 0.25, mean: 0.25 });
  });

  it('refuses an empty sample', () => {
    expect(() => bandOf(new Float64Array(0), 0.9)).toThrow();
  });
});
