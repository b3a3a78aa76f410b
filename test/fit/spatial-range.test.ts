import { describe, expect, it } from 'vitest';
import { estimateRange, medianNearest } from '../../src/fit/spatial-range.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { gridPositions, smoothField, thresholdRange } from '../spatial-landscape.js';

describe('range of spatial autocorrelation (indicator correlogram)', () => {
  it('recovers the known range of median-thresholded Gaussian fields', () => {
    // The known range is Sheppard's (1899) orthant formula applied to the field's correlation
    // (test/spatial-landscape.ts): 4.79 cells at σ = 1.5, 7.98 at σ = 2.5. One 50 × 50 field's
    // estimate varies (seen: 3.4–4.9 and 5.6–14.2 cells over 8 fields; the correlogram of one
    // realisation is itself noisy near 0.05, and centring on the field's own mean biases it a
    // little low), so the median of 8 fields must fall within 20% of the known range and every
    // field's within a factor of 2. Seen with this seed: medians 4.55 and 6.97.
    const random = randomStreams(1983);
    for (const sigma of [1.5, 2.5]) {
      const ranges: number[] = [];
      for (let f = 0; f < 8; f++) {
        const field = smoothField(50, 50, sigma, random.stream(`field:${sigma}:${f}`));
        const estimate = estimateRange(gridPositions(50, 50), Array.from(field, (z) => (z > 0 ? 1 : 0)), 2)!;
        expect(estimate.reached).toBe(true);
        expect(estimate.spacing).toBe(1);
        ranges.push(estimate.range);
      }
      ranges.sort((a, b) => a - b);
      const truth = thresholdRange(sigma);
      const median = (ranges[3]! + ranges[4]!) / 2;
      expect(Math.abs(median - truth) / truth).toBeLessThan(0.2);
      for (const r of ranges) {
        expect(r).toBeGreaterThan(truth / 2);
        expect(r).toBeLessThan(truth * 2);
      }
    }
  });

  it('finds no range beyond one spacing on independent cells', () => {
    const random = randomStreams(7);
    const states = Array.from({ length: 2500 }, () => random.integer(3));
    const estimate = estimateRange(gridPositions(50, 50), states, 3)!;
    // ρ at lag 1 is near 0 (±0.03 for 4,900 neighbour pairs), so the range is interpolated below one cell.
    expect(estimate.range).toBeLessThan(1);
  });

  it('is undefined with one state only (nothing to correlate)', () => {
    expect(estimateRange(gridPositions(5, 5), new Array(25).fill(0), 2)).toBeUndefined();
  });

  it('takes the median nearest-neighbour distance as the spacing', () => {
    // A 10 m grid with one site doubled in place (distance 0 is skipped) and one far outlier.
    const xs = Float64Array.from([0, 10, 20, 0, 10, 20, 20, 500]);
    const ys = Float64Array.from([0, 0, 0, 10, 10, 10, 10, 500]);
    expect(medianNearest(xs, ys)).toBe(10);
  });
});
