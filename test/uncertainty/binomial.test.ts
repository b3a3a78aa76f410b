import { describe, expect, it } from 'vitest';
import gammaln from '@stdlib/math-base-special-gammaln';
import { BTPE_FROM, binomialSampler, logRatioToMode } from '../../src/uncertainty/binomial.js';
import { drawCategorical } from '../../src/uncertainty/categorical.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { chiSquareUpperTail } from '../../src/chain/chi-square.js';

const DRAWS = 400_000;

/** The reference pmf, through @stdlib/math-base-special-gammaln 0.3.1 (a general-purpose library): C(n, x)·pˣ·(1 − p)ⁿ⁻ˣ in logs. */
function pmf(n: number, p: number, x: number): number {
  return Math.exp(gammaln(n + 1) - gammaln(x + 1) - gammaln(n - x + 1) + x * Math.log(p) + (n - x) * Math.log1p(-p));
}

/**
 * Pearson χ² of `DRAWS` draws against the pmf, cells pooled from the left until their expected
 * count reaches 5 (the usual rule for χ²: common practice), the last cell taking the rest of the
 * support; returns the upper-tail p-value and the number of cells.
 */
function chiSquare(n: number, p: number, seed: string): { pValue: number; cells: number } {
  const draw = binomialSampler(randomStreams(20261203).stream(seed));
  const seen = new Map<number, number>();
  for (let d = 0; d < DRAWS; d++) { const x = draw(n, p); seen.set(x, (seen.get(x) ?? 0) + 1); }
  for (const x of seen.keys()) expect(Number.isInteger(x) && x >= 0 && x <= n).toBe(true);
  // Only the support within 12 standard deviations is walked; the mass beyond is below 10⁻³⁰.
  const sd = Math.sqrt(n * p * (1 - p));
  const lo = Math.max(0, Math.floor(n * p - 12 * sd - 2));
  const hi = Math.min(n, Math.ceil(n * p + 12 * sd + 2));
  const want = Float64Array.from({ length: hi - lo + 1 }, (_, i) => DRAWS * pmf(n, p, lo + i));
  // What is expected right of each x, so a cell is closed only if the rest can still make a cell of 5.
  const right = new Float64Array(want.length + 1);
  for (let i = want.length - 1; i >= 0; i--) right[i] = right[i + 1]! + want[i]!;
  let chi2 = 0;
  let cells = 0;
  let pooledSeen = 0;
  let pooledWant = 0;
  let outside = DRAWS;
  for (let x = lo; x <= hi; x++) {
    pooledSeen += seen.get(x) ?? 0;
    outside -= seen.get(x) ?? 0;
    pooledWant += want[x - lo]!;
    if (pooledWant >= 5 && right[x - lo + 1]! >= 5) {
      chi2 += (pooledSeen - pooledWant) ** 2 / pooledWant;
      cells += 1;
      pooledSeen = 0;
      pooledWant = 0;
    }
  }
  chi2 += (pooledSeen - pooledWant) ** 2 / pooledWant;
  cells += 1;
  expect(outside).toBe(0);
  return { pValue: chiSquareUpperTail(chi2, cells - 1), cells };
}

describe('binomialSampler (exact: inversion below n·min(p, 1 − p) = 10, BTPE from it)', () => {
  // 22 cases, each accepted at p-value > 0.001: a false alarm in at most 2.2% of seeds (Bonferroni);
  // the seed is fixed, so the test is deterministic and fails only when the sampler's distribution moves.
  it.each([
    // Small n, inversion, both sides of ½, and the cases where @stdlib/random-base-binomial 0.2.2 was 80+ standard errors off.
    [2, 0.3], [3, 0.9], [15, 0.5], [16, 0.37], [42, 0.7], [42, 0.3], [20, 0.5], [60, 0.05],
    // Around the switch: n·p = 9.9 (inversion) and 10 (BTPE), for p small, p = ½ and p near 1.
    [100, 0.099], [100, 0.1], [990, 0.01], [1000, 0.01], [19, 0.52], [20, 0.5], [1000, 0.9901], [1000, 0.99],
    // p near 0 and 1 with large n; large n in the middle (BTPE's squeeze and Stirling steps: npq ≫ 40).
    [5000, 0.0004], [5000, 0.9996], [5000, 0.003], [5000, 0.37], [1_000_000, 0.001], [1_000_000, 0.6],
  ])('Binomial(%i, %f): Pearson χ² against the pmf accepts at p > 0.001', (n, p) => {
    const { pValue, cells } = chiSquare(n, p, `binomial:${n}:${p}`);
    expect(cells).toBeGreaterThan(1);
    expect(pValue).toBeGreaterThan(0.001);
  });

  it('the switch sits at n·min(p, 1 − p) = 10, the bound Kachitvichyanukul & Schmeiser (1988) give for BTPE', () => {
    expect(BTPE_FROM).toBe(10);
  });

  it('mean and variance within 5 standard errors, inversion and BTPE', () => {
    for (const [n, p] of [[10_000, 0.37], [1_000_000, 0.001], [30, 0.25], [2000, 0.004], [2000, 0.996]] as const) {
      const draw = binomialSampler(randomStreams(7).stream(`large:${n}:${p}`));
      let s = 0;
      let s2 = 0;
      const N = 100_000;
      for (let d = 0; d < N; d++) { const x = draw(n, p); s += x; s2 += x * x; }
      const mean = s / N;
      const variance = s2 / N - mean * mean;
      const v = n * p * (1 - p);
      expect(Math.abs(mean - n * p) / Math.sqrt(v / N)).toBeLessThan(5);
      // Var of the sample variance = (μ₄ − v²)/N, μ₄ = 3v² + v(1 − 6pq) for the binomial.
      const mu4 = 3 * v * v + v * (1 - 6 * p * (1 - p));
      expect(Math.abs(variance - v) / Math.sqrt((mu4 - v * v) / N)).toBeLessThan(5);
    }
  });

  it('edges: p = 0, p = 1 and n = 0 take no uniform and are exact; same stream, same draws', () => {
    const used = { n: 0 };
    const stream = randomStreams(1).stream('edges');
    const draw = binomialSampler({ uniform: () => { used.n += 1; return stream.uniform(); } });
    expect(draw(50, 0)).toBe(0);
    expect(draw(50, 1)).toBe(50);
    expect(draw(0, 0.4)).toBe(0);
    expect(used.n).toBe(0);
    const a = binomialSampler(randomStreams(9).stream('same'));
    const b = binomialSampler(randomStreams(9).stream('same'));
    expect(Array.from({ length: 50 }, () => a(100, 0.4))).toEqual(Array.from({ length: 50 }, () => b(100, 0.4)));
  });

  it('one trial is one Bernoulli trial, U < p, as drawCategorical takes it', () => {
    const u = randomStreams(4).stream('one');
    const draw = binomialSampler(randomStreams(4).stream('one'));
    const w = new Float64Array(2);
    for (const p of [0.01, 0.3, 0.5, 0.77, 0.999]) {
      for (let d = 0; d < 200; d++) {
        w[0] = p;
        w[1] = 1 - p;
        // Multinomial(1, (p, 1 − p)) lands in state 0 exactly when Binomial(1, p) is 1.
        expect(draw(1, p)).toBe(drawCategorical(u.uniform, w, 0, 2) === 0 ? 1 : 0);
      }
    }
  });
});

describe('BTPE step 5.3: ln f(y)/f(M) by Stirling\'s formula', () => {
  it('matches the exact log-ratio from log-gamma (@stdlib gammaln 0.3.1) to 2e-9, on both sides of the mode', () => {
    // The exact value at n = 200, p = ½, y = 79 is −4.4205250668 (scipy.stats.binom.logpmf, by the
    // independent audit); the paper's printed signs gave −4.41708, 3.5·10⁻³ high.
    const exact = (n: number, p: number, m: number, y: number): number =>
      gammaln(m + 1) + gammaln(n - m + 1) - gammaln(y + 1) - gammaln(n - y + 1) + (y - m) * (Math.log(p) - Math.log1p(-p));
    expect(logRatioToMode(200, 0.5, 100, 79)).toBeCloseTo(-4.4205250668, 9);
    for (const [n, p] of [[200, 0.5], [1000, 0.1], [5000, 0.37], [10 ** 6, 0.02]] as const) {
      const m = Math.floor(n * p + p);
      const sd = Math.sqrt(n * p * (1 - p));
      for (const d of [-3, -2, -1, -0.5, 0.5, 1, 2, 3]) {
        const y = Math.max(0, Math.min(n, m + Math.round(d * sd)));
        // 2e-9: at n = 10⁶ the reference itself differences log-gammas near 1.3·10⁷ (about 10⁻⁹ of
        // rounding); the printed signs were off by 2–6·10⁻³.
        expect(Math.abs(logRatioToMode(n, p, m, y) - exact(n, p, m, y))).toBeLessThan(2e-9);
      }
    }
  });
});
