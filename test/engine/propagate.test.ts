import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { propagate } from '../../src/engine/propagate.js';
import { mixAt } from '../../src/engine/layout.js';
import { atLeast, drawsOf, mathjsProjection, mixOf, stochasticMatrix } from '../helpers.js';

describe('propagate (typed-array kernel)', () => {
  it('equals x·Pᵗ computed with mathjs, for several draws at once (property)', () => {
    const arb = fc.integer({ min: 2, max: 7 }).chain((k) =>
      fc.tuple(fc.array(stochasticMatrix(k), { minLength: 1, maxLength: 4 }), mixOf(k), fc.integer({ min: 1, max: 12 })));
    fc.assert(fc.property(arb, ([matrices, x0, horizon]) => {
      const paths = propagate(drawsOf(matrices), x0, horizon);
      matrices.forEach((P, d) => {
        for (const t of [0, 1, horizon]) {
          const expected = mathjsProjection(x0, P, t);
          const got = mixAt(paths.shares, paths, d, t);
          expected.forEach((v, s) => expect(Math.abs(got[s]! - v)).toBeLessThan(1e-12));
        }
      });
    }), { numRuns: 150 });
  });

  it('keeps the same shares when only some steps are recorded', () => {
    const P = [[0.9, 0.1, 0], [0.2, 0.7, 0.1], [0.05, 0.05, 0.9]];
    const all = propagate(drawsOf([P, P]), [0.5, 0.5, 0], 8);
    const some = propagate(drawsOf([P, P]), [0.5, 0.5, 0], 8, { record: [0, 3, 8] });
    expect(some.recorded).toEqual([0, 3, 8]);
    for (const d of [0, 1]) {
      [0, 3, 8].forEach((t, r) => expect(mixAt(some.shares, some, d, r)).toEqual(mixAt(all.shares, all, d, t)));
    }
  });

  it('keeps shares on the simplex (property)', () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 8 }).chain((k) => fc.tuple(stochasticMatrix(k), mixOf(k))), ([P, x0]) => {
      const paths = propagate(drawsOf([P]), x0, 30);
      for (let t = 0; t <= 30; t++) {
        let total = 0;
        for (const v of mixAt(paths.shares, paths, 0, t)) { expect(v).toBeGreaterThanOrEqual(0); total += v; }
        expect(Math.abs(total - 1)).toBeLessThan(1e-12);
      }
    }), { numRuns: 100 });
  });

  it('changes nothing under the identity matrix, and an absorbing state stays absorbing', () => {
    const I = [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
    const paths = propagate(drawsOf([I]), [0.2, 0.3, 0.5], 10);
    expect(mixAt(paths.shares, paths, 0, 10)).toEqual([0.2, 0.3, 0.5]);
    const absorbing = [[1, 0, 0], [0.5, 0.5, 0], [0.2, 0.3, 0.5]];
    const a = propagate(drawsOf([absorbing]), [1, 0, 0], 10);
    expect(mixAt(a.shares, a, 0, 10)).toEqual([1, 0, 0]);
  });

  it('records the first step the target reaches its share and when each state is first most common', () => {
    // From all-0: share of state 1 after t steps is 1 − 0.5ᵗ; it reaches 0.8 at t = 3 (0.875), and
    // becomes the most common at t = 1 (a tie 0.5/0.5 counts as most common for both).
    const P = [[0.5, 0.5], [0, 1]];
    const paths = propagate(drawsOf([P]), [1, 0], 5, { target: atLeast(1, 0.8) });
    expect(paths.firstAtTarget[0]).toBe(3);
    expect(Array.from(paths.firstMostCommon)).toEqual([0, 1]);
    const never = propagate(drawsOf([P]), [1, 0], 2, { target: atLeast(1, 0.8) });
    expect(never.firstAtTarget[0]).toBe(-1);
  });
});
