import { refuseErrors } from './error-fit.js';
import { SereError, quote, type Place } from '../errors.js';
import type { RasterCounts, RasterTally } from '../data/raster/count-stack.js';
import type { BlockTally } from '../data/raster/block-tally.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { SiteCountBuilder } from '../chain/site-counts.js';
import { gapCellsOf, gapNotWholeSteps, pairsByGapOf, periodList, sparseTriples } from '../chain/counts.js';
import { gcd } from '../chain/structure.js';
import type { MixAtTime } from '../chain/latest-mix.js';
import { impossibleMask, type FitSettings } from './settings.js';
import { checkTransitions, type Fit } from './fit.js';

/**
 * A fit from a counted raster stack: every pixel is a site, and the counts by pair of rasters are
 * read with the fit's step — pairs `step` years apart are the one-step counts, whole multiples
 * the counts by gap, any other gap is tallied as skipped — as `fitSurvey` reads a long table.
 * The per-site counts are absent (10⁸ pixels would be 10⁸ sites): the site bootstrap and hindcasts
 * say they need per-site data. `settings.group` picks one zone of the zone raster (its code).
 */
export function fitRasterCounts(counted: RasterCounts, settings: FitSettings): Fit {
  refuseErrors(settings, 'a raster stack is fitted from pooled pixel counts');
  const place: Place = { file: counted.stack.file };
  const tally = settings.group === undefined ? pooled(counted) : zoneTally(counted, settings.group, place);
  const whole = fitTally(counted, tally, settings);
  // Blocks are counted over the whole map: a zone's fit keeps pooled counts only.
  const fit = counted.blocks && settings.group === undefined ? { ...whole, ...rasterBlocks(counted, counted.blocks, whole) } : whole;
  sources.set(fit, { counted, settings });
  return fit;
}

/** The raster stack a fit was made from, with its settings: what probability maps read. */
export interface RasterSource {
  readonly counted: RasterCounts;
  readonly settings: FitSettings;
}
const sources = new WeakMap<Fit, RasterSource>();

/** The raster stack behind a fit, or undefined for a fit of a survey table or fit file. */
export function rasterSourceOf(fit: Fit): RasterSource | undefined {
  return sources.get(fit);
}

/**
 * A zoned fit of a raster stack with a zone raster (`--pooling partial | none`): the pooled fit
 * (with its blocks when the stack was counted in blocks) carrying one fit per zone, each from the
 * zone's own tally — the counts a survey table of the same pixels with a zone column gives, so the
 * pooling (fit/zones.ts, chain/zone-pooling.ts) is the survey table's. Zones are named by their
 * codes. `place` names the pooling setting for errors.
 */
export function fitRasterZoned(counted: RasterCounts, settings: FitSettings, pooling: 'partial' | 'none', place: Place): Fit {
  if (counted.zones === null) {
    throw new SereError('BAD_ZONES', `pooling: ${pooling} needs the stack's zone raster`, place, 'add zones: zones.tif to the stack file, or drop pooling');
  }
  if (pooling === 'partial' && counted.zones.length < 2) {
    throw new SereError('BAD_ZONES', `pooling: partial needs at least two zones; the zone raster holds ${counted.zones.length === 0 ? 'none' : `only zone ${counted.zones[0]}`}`,
      place, 'use pooling: complete (one fit), or a zone raster with two or more zones');
  }
  const whole = fitRasterCounts(counted, settings);
  const zones = counted.zones.map((code, z) => {
    try {
      return { name: String(code), fit: fitTally(counted, counted.tallies[z]!, settings) };
    } catch (err) {
      if (err instanceof SereError && err.code === 'NO_TRANSITIONS') {
        throw new SereError('BAD_ZONES', `zone ${code} has no pixel with two valid years a step apart: its chain cannot be fitted`,
          { file: counted.stack.file, path: 'zones' }, 'merge it into another zone in the zone raster, or drop pooling');
      }
      throw err;
    }
  });
  const fit: Fit = { ...whole, zones: { column: 'zones', pooling, zones } };
  sources.set(fit, { counted, settings });
  return fit;
}

/** One fit per zone (same states and settings), for maps that give each zone its own chain. */
export function fitRasterZones(counted: RasterCounts, settings: FitSettings): { zone: number; fit: Fit }[] {
  return (counted.zones ?? []).map((zone, z) => ({ zone, fit: fitTally(counted, counted.tallies[z]!, settings, true) }));
}

/** The fit's state order (declared, or sorted) and where each counted state goes in it. */
export function rasterStateOrder(counted: RasterCounts, settings: FitSettings): { states: string[]; index: Int32Array } {
  // Raw class codes sort as numbers; labelled states keep the labels' order (by lowest class code).
  const sorted = counted.numericStates ? [...counted.states].sort((a, b) => Number(a) - Number(b)) : [...counted.states];
  const states = settings.states ? [...settings.states] : sorted;
  const index = new Int32Array(counted.states.length);
  counted.states.forEach((s, n) => {
    index[n] = states.indexOf(s);
    if (index[n]! < 0) {
      throw new SereError('UNKNOWN_STATE', `the rasters hold state ${quote(s)}, which is not among the declared states`,
        settings.places?.states ?? { path: '--states' }, `add ${quote(s)} to the states, or map its class code to skip in the stack's labels`);
    }
  });
  return { states, index };
}

function fitTally(counted: RasterCounts, tally: RasterTally, settings: FitSettings, zoneFit = false): Fit {
  const { years } = counted;
  const T = years.length;
  const { states, index } = rasterStateOrder(counted, settings);
  const k = states.length;
  const kc = counted.states.length;
  const mask = impossibleMask(settings.impossible, states, settings.places?.impossible ?? { path: '--impossible' });
  const step = settings.step;
  const counts = new Float64Array(k * k);
  const byGap = new Map<number, Float64Array>();
  const periods = new Map<number, Float64Array>();
  const triples = new Float64Array(k * k * k);
  let transitions = 0;
  for (let u = 0; u < T; u++) {
    for (let t = u + 1; t < T; t++) {
      const pair = tally.pairs[u * T + t];
      if (!pair) continue;
      const gap = years[t]! - years[u]!;
      let into: Float64Array;
      if (gap === step) {
        into = counts;
        for (const x of pair) transitions += x;
        let period = periods.get(years[u]!);
        if (!period) periods.set(years[u]!, period = new Float64Array(k * k));
        addMapped(period, pair, index, kc, k);
      } else {
        if (gap % step !== 0) {
          const divisor = years.slice(1).reduce((d, y, n) => gcd(d, y - years[n]!), 0);
          throw gapNotWholeSteps(counted.stack.file, 0, gap, step, divisor);
        }
        let dense = byGap.get(gap / step);
        if (!dense) byGap.set(gap / step, dense = new Float64Array(k * k));
        into = dense;
      }
      addMapped(into, pair, index, kc, k);
      const run = tally.triples[u * T + t];
      if (run && gap === step) {
        for (let a = 0; a < kc; a++) for (let b = 0; b < kc; b++) for (let c = 0; c < kc; c++) {
          const x = run[(a * kc + b) * kc + c]!;
          if (x > 0) triples[(index[a]! * k + index[b]!) * k + index[c]!] += x;
        }
      }
    }
  }
  const gapCounts = gapCellsOf(byGap, k);
  const pairsByGap = pairsByGapOf(transitions, gapCounts);
  // The checks every fit's counts pass (fit.ts); a zone's fit for maps may have none.
  if (!zoneFit || transitions > 0) {
    checkTransitions({ file: counted.stack.file, states, step, mask, counts, transitions, pairsByGap, gapCounts, firstLine: new Float64Array(k * k) });
  }
  const history: MixAtTime[] = [];
  let surveys = 0;
  for (let t = 0; t < T; t++) {
    const mix = new Array<number>(k).fill(0);
    let sites = 0;
    for (let s = 0; s < kc; s++) {
      const x = tally.history[t * kc + s]!;
      mix[index[s]!]! += x;
      sites += x;
    }
    surveys += sites;
    if (sites > 0) history.push({ time: years[t]!, counts: mix, sites });
  }
  if (history.length === 0) {
    throw new SereError('NO_TRANSITIONS', 'every pixel is nodata or skipped', { file: counted.stack.file }, 'check the nodata value and the labels');
  }
  const last = history[history.length - 1]!;
  return {
    input: { file: counted.stack.file, sha256: counted.sha256 },
    states,
    step,
    prior: settings.prior,
    impossible: settings.impossible,
    counts,
    sites: new SiteCountBuilder(k, false).table(),
    // Every pixel surveyed at least once is a site: each adds its surveys less one consecutive pair.
    pooledSites: surveys - pairsTotal(tally),
    transitions,
    skipped: [],
    gapCounts,
    pairsByGap,
    repeatedRows: 0,
    surveys,
    firstTime: history[0]!.time,
    latest: { time: last.time, counts: last.counts, shares: last.counts.map((c) => c / last.sites), sites: last.sites },
    triples: sparseTriples(triples, k),
    periods: periodList(periods, k),
    history,
  };
}

/**
 * The per-block counts as the fit's sites (one entry per block holding a surveyed pixel, in
 * row-major block order, named `block:ROW:COL`), each block's gapped pairs, and how many pixels each
 * stands for: what the bootstrap resamples (uncertainty/bootstrap.ts, resampleUnits).
 */
function rasterBlocks(counted: RasterCounts, blocks: BlockTally, fit: Fit): Pick<Fit, 'sites' | 'siteGaps' | 'blockSites' | 'spatial'> {
  const { years } = counted;
  const T = years.length;
  const { index } = rasterStateOrder(counted, { step: fit.step, prior: fit.prior, impossible: fit.impossible, columns: DEFAULT_COLUMNS, states: fit.states });
  const k = fit.states.length;
  const kc = blocks.k;
  const sites = new SiteCountBuilder(k, false);
  const gaps = new SiteCountBuilder(k, false);
  const pixels: number[] = [];
  const one = new Float64Array(k * k);
  const wide = new Map<number, number>();
  for (let b = 0; b < blocks.count; b++) {
    if (blocks.pixels[b] === 0) continue;
    one.fill(0);
    wide.clear();
    for (let u = 0; u < T; u++) for (let t = u + 1; t < T; t++) {
      const table = blocks.pairs[u * T + t];
      if (!table) continue;
      const g = (years[t]! - years[u]!) / fit.step;
      for (let a = 0; a < kc; a++) for (let c = 0; c < kc; c++) {
        const x = table[(b * kc + a) * kc + c]!;
        if (x === 0) continue;
        const cell = index[a]! * k + index[c]!;
        if (g === 1) one[cell] += x;
        else wide.set((g - 2) * k * k + cell, (wide.get((g - 2) * k * k + cell) ?? 0) + x);
      }
    }
    one.forEach((x, cell) => { if (x > 0) sites.cell(cell, x); });
    for (const cell of [...wide.keys()].sort((x, y) => x - y)) gaps.cell(cell, wide.get(cell)!);
    const id = `block:${Math.floor(b / blocks.across)}:${b % blocks.across}`;
    sites.endSite(id, undefined);
    gaps.endSite(id, undefined);
    pixels.push(blocks.pixels[b]!);
  }
  const { side, chosenBy, range } = blocks.choice;
  return {
    sites: sites.table(),
    siteGaps: gaps.table(),
    blockSites: Float64Array.from(pixels),
    spatial: { side, chosenBy, ...(range ? { range } : {}), blocks: pixels.length },
  };
}

function addMapped(into: Float64Array, pair: Float64Array, index: Int32Array, kc: number, k: number): void {
  for (let a = 0; a < kc; a++) for (let b = 0; b < kc; b++) {
    const x = pair[a * kc + b]!;
    if (x > 0) into[index[a]! * k + index[b]!] += x;
  }
}


/** Every zone's tally added up (the whole map when there are no zones). */
function pooled(counted: RasterCounts): RasterTally {
  if (counted.tallies.length === 1) return counted.tallies[0]!;
  const T = counted.years.length;
  const kc = counted.states.length;
  const sum: RasterTally = { pairs: [], triples: [], history: new Float64Array(T * kc) };
  for (const tally of counted.tallies) {
    tally.history.forEach((x, n) => { sum.history[n] += x; });
    for (const [key, m] of tally.pairs.entries()) if (m) addInto(sum.pairs, key, m);
    for (const [key, m] of tally.triples.entries()) if (m) addInto(sum.triples, key, m);
  }
  return sum;
}

function addInto(list: (Float64Array | undefined)[], key: number, m: Float64Array): void {
  const into = list[key] ?? (list[key] = new Float64Array(m.length));
  for (let c = 0; c < m.length; c++) into[c] += m[c]!;
}

function zoneTally(counted: RasterCounts, group: string, place: Place): RasterTally {
  if (counted.zones === null) {
    throw new SereError('BAD_OPTION', `fitting zone ${quote(group)} needs a zone raster`, place, 'add zones: zones.tif to the stack file, or drop the group');
  }
  const z = counted.zones.indexOf(Number(group));
  if (z < 0 || !/^-?\d+$/.test(group.trim())) {
    throw new SereError('BAD_OPTION', `no zone ${quote(group)} in the zone raster`, place, `use one of: ${counted.zones.join(', ')}`);
  }
  return counted.tallies[z]!;
}

function pairsTotal(tally: RasterTally): number {
  let n = 0;
  for (const pair of tally.pairs) if (pair) for (const x of pair) n += x;
  return n;
}
