import type { Fit } from '../fit/fit.js';
import { bootstrapInto, bootstrapNotes } from './bootstrap.js';
import type { MatrixDraws } from './draws.js';
import { pointDraws } from './point.js';
import { latentSampleOf, posteriorDraws } from './posterior.js';
import type { RandomStream } from './random.js';
import { blockCount, blockName, DRAW_BLOCK, sharedFloat64 } from './draw-blocks.js';

export type UncertaintySource = MatrixDraws['source'];

/**
 * The one place that picks a sampler by name; every sampler returns the same flat shape. Draws
 * are made in blocks of DRAW_BLOCK, block b from `random.stream('block:b')` (draw-blocks.ts), into
 * shared memory the engine's threads read.
 */
export function drawMatrices(fit: Fit, source: UncertaintySource, count: number, random: RandomStream): MatrixDraws {
  const k = fit.states.length;
  const data = sharedFloat64(count * k * k);
  if (source === 'point') {
    data.set(pointDraws(fit, count).data);
    return { k, count, data, source, notes: [] };
  }
  let emptyRows = 0;
  // With gaps, one sampler run (or the fit's stored one) serves every block.
  const latent = source === 'posterior' ? latentSampleOf(fit, random) : undefined;
  for (let b = 0; b < blockCount(count); b++) {
    const first = b * DRAW_BLOCK;
    const n = Math.min(DRAW_BLOCK, count - first);
    const stream = random.stream(blockName(b));
    if (source === 'bootstrap') emptyRows += bootstrapInto(fit, n, stream, data, first * k * k);
    else data.set(posteriorDraws(fit, n, stream, latent).data, first * k * k);
  }
  return { k, count, data, source, notes: source === 'bootstrap' ? bootstrapNotes(fit, emptyRows) : [] };
}
