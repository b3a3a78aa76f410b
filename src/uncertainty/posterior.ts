import type { Fit } from '../fit/fit.js';
import { fitPrior } from '../fit/fit.js';
import { sampleDirichlet } from './dirichlet.js';
import type { MatrixDraws } from './draws.js';
import type { RandomStream } from './random.js';

/**
 * Posterior draws of the transition matrix: each from-row independently from
 * Dirichlet(nᵢ + αᵢ), the conjugate update of a Dirichlet prior by multinomial counts (Gelman et
 * al. 2013, BDA3 sec. 3.4; for transition matrices, e.g. Lee, Judge & Zellner 1970). A row with
 * no data is drawn from the prior alone; structural zeros stay zero in every draw.
 */
export function posteriorDraws(fit: Fit, count: number, random: RandomStream): MatrixDraws {
  const k = fit.states.length;
  const alpha = fitPrior(fit);
  for (let c = 0; c < k * k; c++) if (alpha[c]! > 0) alpha[c] += fit.counts[c]!;
  const data = new Float64Array(count * k * k);
  for (let d = 0; d < count; d++) {
    for (let i = 0; i < k; i++) sampleDirichlet(random, alpha, i * k, k, data, d * k * k + i * k);
  }
  return { k, count, data, source: 'posterior', notes: [] };
}
