import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { changeRow, type RowChange } from '../../src/chain/row-change.js';
import { mixOf } from '../helpers.js';

const k = 5;
const change: fc.Arbitrary<RowChange> = fc.oneof(
  fc.record({ kind: fc.constant('multiply' as const), cells: fc.uniqueArray(fc.record({ to: fc.nat(k - 1), value: fc.double({ min: 0, max: 5, noNaN: true }) }), { minLength: 1, maxLength: 3, selector: (c) => c.to }) }),
  fc.record({ kind: fc.constant('set' as const), cells: fc.uniqueArray(fc.record({ to: fc.nat(k - 1), value: fc.double({ min: 0, max: 0.33, noNaN: true }) }), { minLength: 1, maxLength: 3, selector: (c) => c.to }) }),
  fc.record({ kind: fc.constant('move' as const), from: fc.nat(k - 1), to: fc.nat(k - 1), share: fc.double({ min: 0, max: 1, noNaN: true }) }),
);

describe('changeRow', () => {
  it('keeps every row stochastic, whatever the change, strength and outcome (property)', () => {
    fc.assert(fc.property(mixOf(k), change, fc.double({ min: 0, max: 1, noNaN: true }), (row, c, w) => {
      const p = Float64Array.from(row);
      changeRow(p, 0, k, c, w, new Float64Array(k));
      let total = 0;
      for (const x of p) { expect(x).toBeGreaterThanOrEqual(0); total += x; }
      expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    }), { numRuns: 500 });
  });

  it('changes nothing with factor 1, with strength 0, or moving a share of 0 (property)', () => {
    fc.assert(fc.property(mixOf(k), fc.nat(k - 1), fc.nat(k - 1), (row, a, b) => {
      const run = (c: RowChange, w: number): number[] => { const p = Float64Array.from(row); changeRow(p, 0, k, c, w, new Float64Array(k)); return Array.from(p); };
      run({ kind: 'multiply', cells: [{ to: a, value: 1 }] }, 1).forEach((x, j) => expect(Math.abs(x - row[j]!)).toBeLessThan(1e-15));
      expect(run({ kind: 'set', cells: [{ to: a, value: 0.3 }] }, 0)).toEqual(row);
      expect(run({ kind: 'move', from: a, to: b, share: 0 }, 1)).toEqual(row);
    }), { numRuns: 200 });
  });

  it('rescales the destinations not listed in proportion (worked by hand)', () => {
    // Row (0.5, 0.3, 0.2); multiply p→1 by 2: 0.6; the others share 0.4 in ratio 5:2 → 0.2857…, 0.1142….
    const p = Float64Array.from([0.5, 0.3, 0.2]);
    expect(changeRow(p, 0, 3, { kind: 'multiply', cells: [{ to: 1, value: 2 }] }, 1, new Float64Array(3))).toBe('ok');
    expect(Array.from(p).map((x) => x.toFixed(12))).toEqual(['0.285714285714', '0.600000000000', '0.114285714286']);
    // Half strength: the midpoint of before and after.
    const q = Float64Array.from([0.5, 0.3, 0.2]);
    changeRow(q, 0, 3, { kind: 'set', cells: [{ to: 2, value: 0.6 }] }, 0.5, new Float64Array(3));
    expect(Array.from(q).map((x) => x.toFixed(12))).toEqual(['0.375000000000', '0.225000000000', '0.400000000000']);
    // Move 40% of the chance of staying (p→0) to p→2.
    const m = Float64Array.from([0.5, 0.3, 0.2]);
    changeRow(m, 0, 3, { kind: 'move', from: 0, to: 2, share: 0.4 }, 1, new Float64Array(3));
    expect(Array.from(m).map((x) => x.toFixed(12))).toEqual(['0.300000000000', '0.300000000000', '0.400000000000']);
  });

  it('caps a factor that would push the row above 1, and leaves a row unchanged when nothing can be rescaled', () => {
    const p = Float64Array.from([0.5, 0.3, 0.2]);
    expect(changeRow(p, 0, 3, { kind: 'multiply', cells: [{ to: 0, value: 3 }] }, 1, new Float64Array(3))).toBe('capped');
    expect(Array.from(p)).toEqual([1, 0, 0]);
    const absorbing = Float64Array.from([0, 0, 1]);
    expect(changeRow(absorbing, 0, 3, { kind: 'multiply', cells: [{ to: 2, value: 0.5 }] }, 1, new Float64Array(3))).toBe('unmet');
    expect(Array.from(absorbing)).toEqual([0, 0, 1]);
  });
});
