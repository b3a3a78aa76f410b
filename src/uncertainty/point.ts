import { fitMle, type Fit } from '../fit/fit.js';
import type { MatrixDraws } from './draws.js';

/**
 * The maximum-likelihood matrix alone, repeated `count` times: a forecast without parameter
 * uncertainty. With one draw the bands collapse to the point projection; more copies are only
 * useful when event years or plot counts add randomness of their own.
 */
export function pointDraws(fit: Fit, count = 1): MatrixDraws {
  const k = fit.states.length;
  const { p } = fitMle(fit);
  const data = new Float64Array(count * k * k);
  for (let d = 0; d < count; d++) data.set(p, d * k * k);
  return { k, count, data, source: 'point', notes: [] };
}
