import type { Place } from '../errors.js';
import type { RasterCounts } from '../data/raster/count-stack.js';
import { rasterBlockChoice } from '../fit/spatial-blocks.js';
import { progressReporter } from './progress.js';

/**
 * Count a raster stack (the raster code loaded only now), in blocks for the spatial block bootstrap
 * when `blockSize` is given: a side in pixels, or `auto` — twice the range of autocorrelation of
 * the latest map, measured on a sample of it before counting (data/raster/latest-sample.ts). With
 * a progress line on stderr when it is a terminal and the counting takes long enough
 * (cli/progress.ts): the share of windows done.
 */
export async function countStack(file: string, blockSize: number | 'auto' | undefined, place: Place, progress: boolean): Promise<RasterCounts> {
  const { countRasterStack } = await import('../data/raster/count-stack.js');
  let blocks;
  if (blockSize !== undefined) {
    const { sampleLatestMap } = await import('../data/raster/latest-sample.js');
    blocks = rasterBlockChoice(await sampleLatestMap(file), blockSize === 'auto' ? undefined : blockSize, place);
  }
  const bar = progressReporter(progress, 'counting pixels', 'percent');
  try {
    return await countRasterStack(file, { ...(blocks ? { blocks } : {}), onProgress: (done, total) => bar.update(Math.floor((100 * done) / total), 100) });
  } finally {
    bar.stop();
  }
}
