import type { Band } from './quantiles.js';

/** Bands by year of one state: arrays aligned with the steps summarised. */
export interface ShareBands {
  readonly median: number[];
  readonly low: number[];
  readonly high: number[];
  readonly mean: number[];
}

export function emptyBands(): ShareBands {
  return { median: [], low: [], high: [], mean: [] };
}

/** Add one year's band and mean to by-year arrays. */
export function appendBand(out: ShareBands, band: Band, mean: number): void {
  out.median.push(band.median);
  out.low.push(band.low);
  out.high.push(band.high);
  out.mean.push(mean);
}
