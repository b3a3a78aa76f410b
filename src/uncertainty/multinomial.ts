import { binomialSampler } from './binomial.js';
import type { RandomStream } from './random.js';

export type Multinomial = (n: number, p: Float64Array, pOffset: number, k: number, out: Int32Array, outOffset: number) => void;

/**
 * Multinomial(n, p) by sequential binomials: Xⱼ ~ Binomial(n − Σ earlier, pⱼ / (1 − Σ earlier p))
 * (e.g. Devroye 1986, Non-Uniform Random Variate Generation, ch. XI.1), with the exact binomial
 * sampler of binomial.ts (inversion or BTPE) on the same stream. Counts are *added* to `out`, so sub-populations can be summed in
 * place. Stops as soon as nothing is left to place, which makes sparse rows cheap.
 */
export function multinomialSampler(random: Pick<RandomStream, 'uniform'>): Multinomial {
  const binomial = binomialSampler(random);
  return (n, p, pOffset, k, out, outOffset) => {
    let left = n;
    let mass = 1;
    for (let j = 0; j < k && left > 0; j++) {
      const pj = p[pOffset + j]!;
      // The last possible destination takes whatever is left (guards against rounding in `mass`).
      const x = j === k - 1 || pj >= mass ? left : pj <= 0 ? 0 : binomial(left, Math.min(1, pj / mass));
      out[outOffset + j] += x;
      left -= x;
      mass -= pj;
    }
  };
}
