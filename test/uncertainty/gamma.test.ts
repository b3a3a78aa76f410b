import gammainc from '@stdlib/math-base-special-gammainc';
import { describe, expect, it } from 'vitest';
import { randomStreams } from '../../src/uncertainty/random.js';

const SHAPES = [0.05, 0.3, 0.5, 1, 2.5, 10, 150];
const N = 20_000;

/**
 * Quantiles 0.05, 0.5 and 0.95 of Gamma(shape, rate 1) from scipy 1.x:
 * `scipy.stats.gamma.ppf([0.05, 0.5, 0.95], shape)`.
 */
const SCIPY: Record<number, [number, number, number]> = {
  0.05: [5.573875481878824e-27, 5.573878440746256e-07, 0.2659323024258409],
  0.3: [3.211034699722965e-05, 0.07313113586695198, 1.372349944100886],
  0.5: [0.001966070000009761, 0.227468211559786, 1.920729410347062],
  1: [0.05129329438755053, 0.6931471805599455, 2.9957322735539895],
  2.5: [0.5727381130308846, 2.175730095547763, 5.535248846758176],
  10: [5.425405697091295, 9.668714614714128, 15.705216422115459],
  150: [130.43906194002417, 149.66679867460903, 170.69755605438436],
};

/** The gamma CDF: the regularised lower incomplete gamma function P(shape, x). */
const cdf = (x: number, shape: number): number => gammainc(x, shape);

function drawsOf(shape: number): Float64Array {
  const random = randomStreams(31337).stream(`gamma-check:${shape}`);
  return Float64Array.from({ length: N }, () => random.gamma(shape)).sort();
}

describe('gamma variates (Marsaglia & Tsang 2000, with the boost below shape 1)', () => {
  it('pass a one-sample Kolmogorov–Smirnov test against the gamma CDF at seven shapes (α = 0.001 each)', () => {
    // Critical value of D for n = 20,000 at α = 0.001: scipy.stats.kstwo.ppf(0.999, 20000) =
    // 0.013776… (the asymptotic K₀.₉₉₉/√n gives 0.013785). Seven independent tests at α = 0.001:
    // a correct sampler fails at least one with chance 1 − 0.999⁷ ≈ 0.007.
    const critical = 0.01377632198266413;
    for (const shape of SHAPES) {
      const x = drawsOf(shape);
      let d = 0;
      for (let i = 0; i < N; i++) {
        const f = cdf(x[i]!, shape);
        d = Math.max(d, (i + 1) / N - f, f - i / N);
      }
      expect(d, `shape ${shape}`).toBeLessThan(critical);
    }
  });

  it('put 5%, 50% and 95% of the draws below scipy\'s quantiles (within 4 standard errors)', () => {
    // The count below a true q-quantile is Binomial(n, q): standard error √(q(1 − q)/n) of the
    // fraction; 4 of them give a false alarm of 6e-5 per check, 21 checks ≈ 0.0013 in all.
    for (const shape of SHAPES) {
      const x = drawsOf(shape);
      SCIPY[shape]!.forEach((quantile, i) => {
        const q = [0.05, 0.5, 0.95][i]!;
        let below = 0;
        while (below < N && x[below]! <= quantile) below++;
        expect(Math.abs(below / N - q), `shape ${shape}, q ${q}`).toBeLessThan(4 * Math.sqrt((q * (1 - q)) / N));
        // And the CDF the KS test uses agrees with scipy's quantile function to 1e-9.
        expect(Math.abs(cdf(quantile, shape) - q), `cdf at shape ${shape}, q ${q}`).toBeLessThan(1e-9);
      });
    }
  });

  it('at shape 10⁸, standardised draws have the normal moments: mean 0, variance 1, fourth moment 3 (4 SE each)', () => {
    // Checked via Gamma(1e8), which is 1e8 + 1e4·(normal + O(1e-4)): a large shape makes M&T's
    // d·(1 + c·x)³ nearly linear in the normal x, so its moments expose the normals'.
    const random = randomStreams(77).stream('normal-check');
    const n = 100_000;
    let m1 = 0; let m2 = 0; let m4 = 0;
    for (let i = 0; i < n; i++) {
      const z = (random.gamma(1e8) - 1e8) / 1e4;
      m1 += z; m2 += z * z; m4 += z ** 4;
    }
    m1 /= n; m2 /= n; m4 /= n;
    // SE: mean 1/√n; second moment √(2/n); fourth moment √((105 − 9)/n) (E z⁸ = 105).
    expect(Math.abs(m1)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(m2 - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
    expect(Math.abs(m4 - 3)).toBeLessThan(4 * Math.sqrt(96 / n));
  });
});
