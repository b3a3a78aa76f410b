import type { Fit } from '../fit/fit.js';
import { bootstrapDraws } from './bootstrap.js';
import type { MatrixDraws } from './draws.js';
import { pointDraws } from './point.js';
import { posteriorDraws } from './posterior.js';
import type { RandomStream } from './random.js';

export type UncertaintySource = MatrixDraws['source'];

/** The one place that picks a sampler by name; every sampler returns the same flat shape. */
export function drawMatrices(fit: Fit, source: UncertaintySource, count: number, random: RandomStream): MatrixDraws {
  switch (source) {
    case 'posterior': return posteriorDraws(fit, count, random);
    case 'bootstrap': return bootstrapDraws(fit, count, random);
    case 'point': return pointDraws(fit, count);
  }
}
