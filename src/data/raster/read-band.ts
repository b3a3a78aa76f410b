import type { OpenRaster } from './open-raster.js';

/** Pixels aimed for in one window: 2²¹ (2 MB of 8-bit codes per raster). */
const WINDOW_PIXELS = 2 ** 21;

/** A rectangle of pixels: columns x0 … x1 − 1, rows y0 … y1 − 1. */
export interface Window {
  readonly x0: number;
  readonly y0: number;
  readonly x1: number;
  readonly y1: number;
}

/**
 * The windows a raster is read in, left to right within top to bottom: whole blocks, about
 * WINDOW_PIXELS each, so the geotiff package decodes each tile or strip once. A strip spans the
 * width, so a stripped raster is read in bands of whole strips; a tiled one, when a row of tiles
 * is wider than that, in runs of whole tiles along the row — memory then holds a few tiles per
 * raster however wide the map.
 */
export function readWindows(raster: OpenRaster, target = WINDOW_PIXELS): Window[] {
  const { width, height } = raster.grid;
  const blockRows = raster.blockRows;
  const tiled = raster.image.isTiled;
  const tileWidth = tiled ? raster.image.getTileWidth() : width;
  const rows = Math.min(height, blockRows * Math.max(1, Math.floor(target / (width * blockRows))));
  const cols = !tiled || width * blockRows <= target ? width
    : Math.min(width, tileWidth * Math.max(1, Math.floor(target / (tileWidth * blockRows))));
  const windows: Window[] = [];
  for (let y0 = 0; y0 < height; y0 += rows) {
    for (let x0 = 0; x0 < width; x0 += cols) windows.push({ x0, y0, x1: Math.min(width, x0 + cols), y1: Math.min(height, y0 + rows) });
  }
  return windows;
}

/** The pixels of a window of a one-band raster, row by row, read with the geotiff package's windowed reader. */
export async function readWindow(raster: OpenRaster, w: Window): Promise<ArrayLike<number>> {
  const data = await raster.image.readRasters({ window: [w.x0, w.y0, w.x1, w.y1], samples: [0], interleave: true });
  return data as unknown as ArrayLike<number>;
}

/** Rows y0 … y1 − 1, full width. */
export async function readBand(raster: OpenRaster, y0: number, y1: number): Promise<ArrayLike<number>> {
  return readWindow(raster, { x0: 0, y0, x1: raster.grid.width, y1 });
}
