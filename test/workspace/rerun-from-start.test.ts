import { describe, expect, it } from 'vitest';
import { carriedStart, movedStart } from '../../src/workspace/rerun-from-start.js';
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

describe('moving a zoned fit to the previous record\'s start', () => {
  const mix = (time: number, counts: number[]) => {
    const sites = counts.reduce((a, b) => a + b, 0);
    return { time, counts, shares: counts.map((c) => c / sites), sites };
  };
  const zoned = (latest: ReturnType<typeof mix>, zones: [string, ReturnType<typeof mix>][]) => ({
    states: ['a', 'b'], latest,
    zones: { column: 'zone', pooling: 'partial', zones: zones.map(([name, l]) => ({ name, fit: { states: ['a', 'b'], latest: l } })) },
  }) as unknown as Fit;
  const now = zoned(mix(2024, [5, 5]), [['east', mix(2024, [4, 1])], ['west', mix(2024, [1, 4])]]);

  it('starts every zone from that zone\'s previous mix, not only the landscape', () => {
    const before = zoned(mix(2023, [6, 4]), [['east', mix(2023, [5, 0])], ['west', mix(2023, [1, 4])]]);
    const moved = movedStart(before, now)!;
    expect(moved.latest).toMatchObject({ time: 2023, counts: [6, 4] });
    expect(moved.zones!.zones.map((z) => [z.name, z.fit.latest.time, z.fit.latest.counts])).toEqual([['east', 2023, [5, 0]], ['west', 2023, [1, 4]]]);
    expect(now.zones!.zones[0]!.fit.latest.counts).toEqual([4, 1]); // this season's fit is left as it was
  });
  it('is the fit itself when nothing moved, and null when the zones differ or the previous record had none', () => {
    expect(movedStart(now, now)).toBe(now);
    expect(movedStart(zoned(mix(2023, [6, 4]), [['east', mix(2023, [5, 0])], ['north', mix(2023, [1, 4])]]), now)).toBeNull();
    expect(movedStart({ states: ['a', 'b'], latest: mix(2023, [6, 4]) } as unknown as Fit, now)).toBeNull();
  });
});
