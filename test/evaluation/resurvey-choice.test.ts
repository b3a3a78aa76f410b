import { describe, expect, it } from 'vitest';
import { resurveyedStates } from '../../src/evaluation/resurvey-choice.js';
import { largestRemainderOfCounts } from '../../src/scenario/largest-remainder.js';
import { randomStreams } from '../../src/uncertainty/random.js';

const perState = (states: number[], k: number): number[] => {
  const n = new Array<number>(k).fill(0);
  for (const s of states) n[s]! += 1;
  return n;
};

describe('which plots a simulated future survey revisits', () => {
  it('30 of the demo\'s 60 latest plots: every state in proportion, not the first 30 in state order', () => {
    // The demo's 2024 survey: 8 mudflat, 4 pioneer, 20 low-marsh, 18 high-marsh, 10 rank-grass.
    // Quotas for 30 of 60 are exactly half of each count; the first 30 in state order would be 8, 4, 18, 0, 0.
    for (const seed of [1, 2, 3, 99]) {
      expect(perState(resurveyedStates([8, 4, 20, 18, 10], 30, randomStreams(seed)), 5)).toEqual([4, 2, 10, 9, 5]);
    }
  });

  it('largest remainder in exact arithmetic: 7 of 60 plots split 8/4/20/18/10', () => {
    // Quotas 0.933, 0.467, 2.333, 2.1, 1.167: floors 0, 0, 2, 2, 1 (5); the two largest remainders (mudflat, pioneer) get one more.
    expect(largestRemainderOfCounts([8, 4, 20, 18, 10], 7)).toEqual([1, 1, 2, 2, 1]);
    // Remainders tie exactly here (3·5 mod 12 = 3 for each state); the tie order decides.
    expect(largestRemainderOfCounts([3, 3, 3, 3], 5, [2, 0, 1, 3])).toEqual([1, 1, 2, 1]);
  });

  it('equal remainders are broken at random (seeded), not always towards the first states', () => {
    const chosen = [0, 0, 0, 0];
    for (let seed = 1; seed <= 400; seed++) {
      const states = resurveyedStates([5, 5, 5, 5], 2, randomStreams(seed));
      expect(states).toHaveLength(2);
      expect(new Set(states).size).toBe(2);
      for (const s of states) chosen[s]! += 1;
    }
    // Each state is in 2 of 4 places on average: 200 of 400 (binomial sd 10).
    for (const n of chosen) expect(Math.abs(n - 200)).toBeLessThan(50);
    expect(resurveyedStates([5, 5, 5, 5], 2, randomStreams(17))).toEqual(resurveyedStates([5, 5, 5, 5], 2, randomStreams(17)));
  });

  it('more sites than the latest survey: every latest plot, then new plots from the latest mix', () => {
    const n = perState(resurveyedStates([8, 4, 20, 18, 10], 240, randomStreams(5)), 5);
    expect(n.reduce((a, b) => a + b, 0)).toBe(240);
    [8, 4, 20, 18, 10].forEach((m, s) => expect(n[s]).toBeGreaterThanOrEqual(m));
  });
});
