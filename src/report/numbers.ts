import { siteCount, type Fit } from '../fit/fit.js';
import type { Band } from '../engine/quantiles.js';

/** A share as a whole percent; shares under half a percent but above zero show as "<1". */
export function percent(x: number): string {
  if (x > 0 && x < 0.005) return '<1';
  return String(Math.round(x * 100));
}

/** `median [low–high]` as percents; a band that has collapsed to a point shows the point alone. */
export function percentBand(b: Band): string {
  const [m, lo, hi] = [percent(b.median), percent(b.low), percent(b.high)];
  return lo === hi && lo === m ? m : `${m} [${lo}–${hi}]`;
}

export function probability(x: number): string {
  return x.toFixed(3);
}

/** A probability with its interval, two decimals each so a 6-state matrix fits in 100 columns. */
export function probabilityBand(median: number, low: number, high: number): string {
  const f = (x: number): string => x.toFixed(2);
  return low === high ? f(median) : `${f(median)} [${f(low)}–${f(high)}]`;
}

/** A band of whole numbers (years, plots): `median [low–high]`, or the point when it has collapsed. */
export function wholeBand(b: Band): string {
  return b.low === b.high ? String(b.median) : `${b.median} [${b.low}–${b.high}]`;
}

/** The band's tails as a label: level 0.9 → "5%–95%". */
export function levelLabel(level: number): string {
  const tail = ((1 - level) / 2) * 100;
  const fmt = (x: number): string => String(Number(x.toFixed(2)));
  return `${fmt(tail)}%–${fmt(100 - tail)}%`;
}

/** "1 site", "60 sites". */
export function count(n: number, noun: string): string {
  return `${n} ${noun}${n === 1 ? '' : 's'}`;
}

/** How many sites the latest survey covered, and a warning when it missed some. */
export function latestCoverage(latestSites: number, allSites: number): string {
  // allSites 0: a fit from counts alone (a raster stack), whose sites are not listed.
  return latestSites === allSites || allSites === 0
    ? count(latestSites, 'site')
    : `${latestSites} of ${allSites} sites; the others were last surveyed earlier and are not in this mix`;
}

/** A signed number: +3, −2, 0 (a true minus sign); with `digits`, fixed decimals except for zero. */
export function signed(x: number, digits?: number): string {
  if (x === 0) return '0';
  const size = digits === undefined ? String(Math.abs(x)) : Math.abs(x).toFixed(digits);
  return `${x > 0 ? '+' : '−'}${size}`;
}

/** How many sites a fit rests on, and whether it pooled their counts (a counts table or a raster stack). */
export function fitSites(fit: Fit): string {
  const n = siteCount(fit);
  return fit.pooledSites === undefined ? count(n, 'site') : `${count(n, 'site')} (pooled counts, no per-site data)`;
}

/**
 * A concentration κ: one decimal below 10, whole from 10, with thousands separated by commas from
 * 1,000 (by hand: toLocaleString's first call loads the locale data, 30 ms of a forecast).
 */
export function concentration(x: number): string {
  if (x < 10) return x.toFixed(1);
  return String(Math.round(x)).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
