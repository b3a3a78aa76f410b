import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import { describe, expect, it } from 'vitest';
import { xoshiroUniforms } from '../../src/uncertainty/xoshiro.js';

describe('xoshiro256** uniforms', () => {
  it('reproduce the reference generator from state {1, 2, 3, 4}, across a refill', () => {
    // Outputs x of Blackman & Vigna's xoshiro256starstar.c from s = {1, 2, 3, 4} (11520, 0,
    // 1509978240, 1215971899390074240, …), as (x >> 11)·2⁻⁵³, computed in Python with exact
    // integers from the C code: `(next() >> 11) * 2**-53`. Draws 300 and 1000 lie past the first
    // and third block of 256.
    const u = xoshiroUniforms(Uint32Array.of(1, 0, 2, 0, 3, 0, 4, 0));
    const first = Array.from({ length: 6 }, () => u());
    expect(first).toEqual([5.551115123125783e-16, 0, 8.185607747179802e-11, 0.06591796875000211, 0.06592882351924556, 0.032959110308424244]);
    const later: number[] = [];
    for (let n = 7; n <= 1000; n++) { const x = u(); if (n === 300 || n === 1000) later.push(x); }
    expect(later).toEqual([0.5917759356504708, 0.18838215260659652]);
  });

  it('fall evenly in 100 bins, and consecutive pairs in 10 × 10 cells (χ² tests, α = 0.001 each)', () => {
    // Two χ² goodness-of-fit tests on one stream of 10⁶ draws (and its 5·10⁵ pairs); a sound
    // generator fails either with chance 0.001, both together at most 0.002. Critical value
    // χ²₀.₉₉₉(99) = 148.230359165… (scipy.stats.chi2.ppf(0.999, 99)), from stdlib here.
    const critical = chisquareQuantile(0.999, 99);
    expect(critical).toBeCloseTo(148.23035916510173, 8);
    const u = xoshiroUniforms(Uint32Array.of(0x9e3779b9, 0x7f4a7c15, 0xf39cc060, 0x5cedc834, 0x2545f491, 0x4f6cdd1d, 0x1b873593, 0xcc9e2d51));
    const n = 1_000_000;
    const bins = new Float64Array(100);
    const pairs = new Float64Array(100);
    let outside = 0;
    for (let i = 0; i < n; i += 2) {
      const a = u();
      const b = u();
      if (!(a >= 0 && a < 1 && b >= 0 && b < 1)) outside++;
      bins[Math.floor(a * 100)]++;
      bins[Math.floor(b * 100)]++;
      pairs[Math.floor(a * 10) * 10 + Math.floor(b * 10)]++;
    }
    expect(outside).toBe(0);
    const chi2 = (counts: Float64Array, total: number): number => {
      const expected = total / counts.length;
      return counts.reduce((s, c) => s + (c - expected) ** 2 / expected, 0);
    };
    expect(chi2(bins, n)).toBeLessThan(critical);
    expect(chi2(pairs, n / 2)).toBeLessThan(critical);
  });
});
