import type { OpenRaster } from './open-raster.js';

/** Pixels aimed for in one band of rows: 2²¹ (2 MB of 8-bit codes per raster). */
const BAND_PIXELS = 2 ** 21;

/**
 * Rows read at once: whole blocks (a row of tiles, or whole strips), as many as fit in about
 * BAND_PIXELS, at least one block — so the geotiff package decodes each tile or strip once.
 */
export function bandRows(raster: OpenRaster, width: number): number {
  const block = raster.blockRows;
  return Math.min(raster.grid.height, block * Math.max(1, Math.floor(BAND_PIXELS / (width * block))));
}

/** Rows y0 … y1 − 1 of a one-band raster, read with the geotiff package's windowed reader. */
export async function readBand(raster: OpenRaster, y0: number, y1: number): Promise<ArrayLike<number>> {
  const data = await raster.image.readRasters({ window: [0, y0, raster.grid.width, y1], samples: [0], interleave: true });
  return data as unknown as ArrayLike<number>;
}
