import { describe, expect, it } from 'vitest';
import { rowsRestingOnPrior } from '../../src/chain/prior-reliance.js';
import { restrictChain } from '../../src/chain/restrict.js';

describe('rows that rest on the prior', () => {
  // The demo's counts (from → to: mudflat, pioneer, low-marsh, high-marsh, rank-grass) and its
  // Jeffreys prior with mudflat>high-marsh and rank-grass>mudflat impossible.
  const counts = [92, 37, 6, 0, 0, 14, 52, 25, 6, 1, 4, 5, 121, 20, 0, 2, 0, 5, 77, 5, 0, 0, 0, 0, 35];
  const alpha = counts.map((_, c) => (c === 3 || c === 20 ? 0 : 0.5));

  it('flags a state never seen to leave, and one whose leaving the prior still moves by 10% or more', () => {
    const flagged = rowsRestingOnPrior(counts, alpha, 5);
    // high-marsh left 12 times; the prior adds 4 × 0.5 = 2 to leaving: 2 / 14 = 14% ≥ 10%.
    // rank-grass stayed 35 times and never left: 0 < 10. mudflat (43 leavings, 1.5 / 44.5 = 3%) and
    // low-marsh (29 leavings, 2 / 31 = 6%) and pioneer (46) are data.
    expect(flagged).toEqual([
      { state: 3, reason: 'prior-share', observed: 89, leaving: 12, priorLeaving: 2 },
      { state: 4, reason: 'rarely-left', observed: 35, leaving: 0, priorLeaving: 1.5 },
    ]);
  });

  it('a state never surveyed as a from-state is flagged; one that stays put by declaration is not', () => {
    // Rows a and b left 20 and 23 times, against 2 pseudo-counts (9% and 8%): data. Row c has no transitions.
    const c = [50, 20, 0, 20, 50, 3, 0, 0, 0];
    expect(rowsRestingOnPrior(c, new Array(9).fill(1), 3).map((r) => [r.state, r.reason])).toEqual([[2, 'never-from']]);
    // Row 2 may only stay (both leaving cells impossible): nothing for the prior to decide.
    expect(rowsRestingOnPrior(c, [1, 1, 1, 1, 1, 1, 0, 0, 1], 3)).toEqual([]);
  });
});

describe('the chain restricted to some states', () => {
  it('keeps their rows and columns and renormalises each row', () => {
    const p = [0.5, 0.3, 0.2, 0.4, 0.4, 0.2, 1 / 3, 1 / 3, 1 / 3];
    const r = Array.from(restrictChain(p, 3, [0, 1])!);
    [0.625, 0.375, 0.5, 0.5].forEach((x, c) => expect(r[c]).toBeCloseTo(x, 15));
  });

  it('is undefined when a kept state can only move to dropped ones', () => {
    expect(restrictChain([0.5, 0.5, 0, 0, 0, 1, 0, 0, 1], 3, [0, 1])).toBeNull();
  });
});
