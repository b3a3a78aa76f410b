import { describe, expect, it } from 'vitest';
import { combinations } from 'mathjs';
import { binomialSampler } from '../../src/uncertainty/binomial.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { chiSquareUpperTail } from '../../src/chain/chi-square.js';

const DRAWS = 100_000;

describe('binomialSampler (exact, by order-statistic splitting)', () => {
  // The cases where @stdlib/random-base-binomial 0.2.2 was 80+ standard errors off, and small ones.
  it.each([[42, 0.7], [42, 0.3], [20, 0.5], [60, 0.05], [15, 0.5], [3, 0.9]])(
    'Binomial(%i, %f): Pearson χ² against the exact pmf (mathjs combinations) accepts at p > 0.001', (n, p) => {
      const draw = binomialSampler(randomStreams(20261202).stream(`binomial:${n}:${p}`));
      const seen = new Array<number>(n + 1).fill(0);
      for (let d = 0; d < DRAWS; d++) seen[draw(n, p)]! += 1;
      // Cells with expected counts under 5 pooled into their neighbours (the usual rule for χ²: common practice).
      let chi2 = 0;
      let cells = 0;
      let pooledSeen = 0;
      let pooledWant = 0;
      for (let x = 0; x <= n; x++) {
        pooledSeen += seen[x]!;
        pooledWant += DRAWS * combinations(n, x) * p ** x * (1 - p) ** (n - x);
        if (pooledWant >= 5 || x === n) {
          chi2 += (pooledSeen - pooledWant) ** 2 / pooledWant;
          cells += 1;
          pooledSeen = 0;
          pooledWant = 0;
        }
      }
      expect(chiSquareUpperTail(chi2, cells - 1)).toBeGreaterThan(0.001);
    });

  it('large n: mean and variance within 5 standard errors (n = 10,000, p = 0.37; n = 10⁶, p = 0.001)', () => {
    for (const [n, p] of [[10_000, 0.37], [1_000_000, 0.001]] as const) {
      const draw = binomialSampler(randomStreams(7).stream(`large:${n}`));
      let s = 0;
      let s2 = 0;
      const N = 20_000;
      for (let d = 0; d < N; d++) { const x = draw(n, p); s += x; s2 += x * x; }
      const mean = s / N;
      const variance = s2 / N - mean * mean;
      const v = n * p * (1 - p);
      expect(Math.abs(mean - n * p) / Math.sqrt(v / N)).toBeLessThan(5);
      // Var of the sample variance ≈ 2v²/N for a near-normal count.
      expect(Math.abs(variance - v) / (v * Math.sqrt(2 / N))).toBeLessThan(5);
    }
  });

  it('edges: p = 0, p = 1 and n = 0 are exact; same stream, same draws', () => {
    const draw = binomialSampler(randomStreams(1).stream('edges'));
    expect(draw(50, 0)).toBe(0);
    expect(draw(50, 1)).toBe(50);
    expect(draw(0, 0.4)).toBe(0);
    const a = binomialSampler(randomStreams(9).stream('same'));
    const b = binomialSampler(randomStreams(9).stream('same'));
    expect(Array.from({ length: 50 }, () => a(100, 0.4))).toEqual(Array.from({ length: 50 }, () => b(100, 0.4)));
  });
});
