import { discreteBandOf, type Band } from './quantiles.js';

/**
 * Fewest draws a timing band (a first year, a number of years earlier) is shown from. A timing
 * band rests only on the draws in which the event happens, which can be a handful of a run's
 * thousands (2 of 4,000 draws reaching a target). Its ends are order statistics (type 1): at level
 * 0.9 from n draws, the ⌈0.05·n⌉-th smallest and largest values. From 50 draws each end is the
 * third value from its extreme; from fewer, the ends (and with under ten draws the median too)
 * are one or two draws' values that move wholesale with the seed, and print as a band that looks
 * far surer than it is. Below it sere gives the count alone.
 */
export const MIN_BAND_DRAWS = 50;

/** A band of whole numbers (steps, years) over draws, or null when it would rest on too few draws. */
export function timingBand(sample: Int32Array, level: number): Band | null {
  return sample.length < MIN_BAND_DRAWS ? null : discreteBandOf(sample, level);
}
