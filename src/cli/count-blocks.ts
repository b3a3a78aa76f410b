import type { Place } from '../errors.js';
import type { RasterCounts } from '../data/raster/count-stack.js';
import { rasterBlockChoice } from '../fit/spatial-blocks.js';

/**
 * Count a raster stack, in blocks for the spatial block bootstrap when `blockSize` is given: a side
 * in pixels, or `auto` — twice the range of autocorrelation of the latest map, measured on a sample
 * of it before counting (data/raster/latest-sample.ts). Loaded lazily with the raster code.
 */
export async function countStack(file: string, blockSize: number | 'auto' | undefined, place: Place): Promise<RasterCounts> {
  const { countRasterStack } = await import('../data/raster/count-stack.js');
  if (blockSize === undefined) return countRasterStack(file);
  const { sampleLatestMap } = await import('../data/raster/latest-sample.js');
  const blocks = rasterBlockChoice(await sampleLatestMap(file), blockSize === 'auto' ? undefined : blockSize, place);
  return countRasterStack(file, { blocks });
}
