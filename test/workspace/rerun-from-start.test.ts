import { describe, expect, it } from 'vitest';
import { carriedStart } from '../../src/workspace/rerun-from-start.js';
import type { Fit } from '../../src/fit/fit.js';

describe('carrying the previous record\'s start into this fit', () => {
  const latest = { time: 2023, counts: [3, 0, 1], shares: [0.75, 0, 0.25], sites: 4 };
  it('reorders the counts by state name', () => {
    const fit = { states: ['c', 'a', 'b', 'd'] } as unknown as Fit;
    expect(carriedStart({ states: ['a', 'b', 'c'], latest }, fit)).toEqual({ time: 2023, counts: [1, 3, 0, 0], shares: [0.25, 0.75, 0, 0], sites: 4 });
  });
  it('cannot carry a start holding a state this fit does not know, unless no site was in it', () => {
    expect(carriedStart({ states: ['a', 'b', 'c'], latest }, { states: ['a', 'b'] } as unknown as Fit)).toBeNull();
    expect(carriedStart({ states: ['a', 'b', 'c'], latest }, { states: ['a', 'c'] } as unknown as Fit)?.counts).toEqual([3, 1]);
  });
});
