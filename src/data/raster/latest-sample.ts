import { openRaster } from './open-raster.js';
import { readWindow } from './read-band.js';
import { readRasterStack, SKIP } from './stack-file.js';

/** Side, in pixels, of the square of the latest map sampled for the range of autocorrelation. */
export const SAMPLE_SQUARE = 256;
/** Pixels per side of the lattice taken from that square (63² = 3,969 sites: every pair is compared). */
export const SAMPLE_LATTICE = 63;

/**
 * A sample of the latest map's states for the range of spatial autocorrelation (fit/spatial-range.ts):
 * the centred square of up to SAMPLE_SQUARE pixels a side, thinned to a regular lattice of at most
 * SAMPLE_LATTICE × SAMPLE_LATTICE pixels (every m-th row and column, so distances stay exact). Ranges
 * from the lattice step up to about half the square can be measured; a longer one shows as not
 * reached. Positions are in pixels; states are numbered by first appearance (labels merge codes;
 * nodata and skipped codes are left out).
 */
export async function sampleLatestMap(stackFile: string): Promise<{ positions: Float64Array; states: Int32Array; k: number; width: number; height: number }> {
  const stack = readRasterStack(stackFile);
  const last = stack.rasters[stack.rasters.length - 1]!;
  const raster = await openRaster(last.file, stack.locate(last.path));
  try {
    const { width, height } = raster.grid;
    const side = Math.min(width, height, SAMPLE_SQUARE);
    const x0 = Math.floor((width - side) / 2);
    const y0 = Math.floor((height - side) / 2);
    const step = Math.max(1, Math.ceil(side / SAMPLE_LATTICE));
    const band = await readWindow(raster, { x0, y0, x1: x0 + side, y1: y0 + side });
    const names = new Map<string, number>();
    const positions: number[] = [];
    const states: number[] = [];
    for (let y = 0; y < side; y += step) {
      for (let x = 0; x < side; x += step) {
        const code = band[y * side + x]!;
        if (code === raster.nodata) continue;
        const name = stack.labels ? stack.labels.get(code) : String(code);
        if (name === undefined || name === SKIP) continue;
        let s = names.get(name);
        if (s === undefined) names.set(name, s = names.size);
        positions.push(x, y);
        states.push(s);
      }
    }
    return { positions: Float64Array.from(positions), states: Int32Array.from(states), k: names.size, width, height };
  } finally {
    void raster.tiff.close();
  }
}
