import { maximumLikelihood } from '../chain/estimates.js';
import { fitPrior, type Fit } from '../fit/fit.js';
import type { MatrixDraws } from './draws.js';

/**
 * The maximum-likelihood matrix alone, as a single draw: a forecast without parameter
 * uncertainty, whose bands collapse to the point projection.
 */
export function pointDraws(fit: Fit): MatrixDraws {
  const k = fit.states.length;
  const { p } = maximumLikelihood(fit.counts, fitPrior(fit), k);
  return { k, count: 1, data: Float64Array.from(p), source: 'point', notes: [] };
}
