import { SereError, type Place } from '../errors.js';
import { settingName } from '../setting-name.js';
import { edgeLag, estimateRange, type RangeEstimate } from './spatial-range.js';
import type { BlockChoice } from '../data/raster/block-tally.js';

/**
 * Below this many blocks the block bootstrap's bands are themselves unreliable: a resample of fewer
 * than about 20 blocks takes few distinct combinations and its spread is noisy. A rule of thumb
 * (common practice, the figure from memory, not derived): Lahiri (2003, ch. 12) needs the number of
 * blocks to grow with the data for the block bootstrap to be consistent, and the site bootstrap's
 * own coverage fell to 75% at 20 sites (BOOTSTRAP_FEW_SITES, measured) — blocks are its units here.
 */
export const FEW_BLOCKS = 20;

/**
 * The block side as a multiple of the range. Blocks cut pairs of dependent sites at their edges,
 * and the block bootstrap's variance is biased low by a share of order (range / side) (Künsch
 * 1989; Lahiri 2003, ch. 3, for the 1/ℓ bias of block variance estimators) — a side of one range
 * left the bands too narrow. Measured (test/slow/block-bootstrap-coverage.test.ts, 96 × 96 cells
 * whose patches change together, range ≈ 5 cells, 80 landscapes): without the edge correction
 * (edgeCorrection below) 90% bands covered the true expected mix 79% of the time with a side of one
 * range, 83–86% with two, 84–88% with three or four (independent cells: 43–52%); with it 91% at
 * two and three ranges, 88% at four. Two ranges keeps more blocks on small maps.
 */
export const BLOCK_RANGES = 2;

/** How the bootstrap groups sites into square blocks, and why that size. */
export interface SpatialBlocks {
  /** Side of a block in projected units (on a raster: in pixels). */
  readonly side: number;
  /** `range`: the side is the states' range of autocorrelation; `given`: a flag or key set it. */
  readonly chosenBy: 'range' | 'given';
  /**
   * The range estimate behind a chosen side (absent when given), with the correlogram's mean edge
   * distance (spatial-range.ts edgeLag: absent in fit files written before the edge correction).
   */
  readonly range?: Pick<RangeEstimate, 'range' | 'reached' | 'spacing' | 'sites'> & { readonly edgeLag?: number };
  /** Blocks that hold at least one site. */
  readonly blocks: number;
}

/** The units the bootstrap draws: unit u holds sites `members[start[u]] … members[start[u + 1] − 1]`, `sites[u]` sites in all. */
export interface ResampleUnits {
  readonly count: number;
  readonly start: Int32Array;
  readonly members: Int32Array;
  /** Sites a unit stands for: 1 per survey site; a raster block's pixels. */
  readonly sites: Float64Array;
}

/**
 * The blocks of sites at `positions` (x, y per site) with square blocks of `side` units, their
 * corner at the sites' smallest x and y. Blocks are numbered by their first site in site order, so
 * with one site per block, block b is site b and the draws are the site bootstrap's.
 */
export function blockUnits(positions: Float64Array, side: number): ResampleUnits {
  const n = positions.length / 2;
  let x0 = Infinity, y0 = Infinity;
  for (let s = 0; s < n; s++) {
    x0 = Math.min(x0, positions[2 * s]!);
    y0 = Math.min(y0, positions[2 * s + 1]!);
  }
  const blockOf = new Int32Array(n);
  const ids = new Map<string, number>();
  for (let s = 0; s < n; s++) {
    const key = `${Math.floor((positions[2 * s]! - x0) / side)},${Math.floor((positions[2 * s + 1]! - y0) / side)}`;
    let b = ids.get(key);
    if (b === undefined) ids.set(key, b = ids.size);
    blockOf[s] = b;
  }
  const count = ids.size;
  const start = new Int32Array(count + 1);
  for (let s = 0; s < n; s++) start[blockOf[s]! + 1] += 1;
  for (let b = 0; b < count; b++) start[b + 1] += start[b]!;
  const next = start.slice(0, count);
  const members = new Int32Array(n);
  for (let s = 0; s < n; s++) members[next[blockOf[s]!]++] = s;
  const sites = new Float64Array(count);
  for (let b = 0; b < count; b++) sites[b] = start[b + 1]! - start[b]!;
  return { count, start, members, sites };
}

/** Every site its own unit: the site bootstrap. */
export function siteUnits(n: number): ResampleUnits {
  const start = new Int32Array(n + 1);
  for (let s = 0; s <= n; s++) start[s] = s;
  return { count: n, start, members: start.subarray(0, n), sites: new Float64Array(n).fill(1) };
}

/** The larger side of the box around the positions. */
export function extentOf(positions: Float64Array): number {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (let s = 0; s < positions.length; s += 2) {
    x0 = Math.min(x0, positions[s]!); x1 = Math.max(x1, positions[s]!);
    y0 = Math.min(y0, positions[s + 1]!); y1 = Math.max(y1, positions[s + 1]!);
  }
  return Math.max(x1 - x0, y1 - y0);
}

/** A given block side: a positive number no larger than the sites' extent (else one block holds everything). */
export function checkBlockSide(side: number, extent: number, place: Place, unit = 'projected units'): void {
  if (!(side > 0) || !Number.isFinite(side)) {
    throw new SereError('BAD_OPTION', `the block size must be a positive number (${unit}), not ${side}`, place,
      'give the side of a square block, e.g. 500, or leave it out to choose it from the range of autocorrelation');
  }
  if (side > extent) {
    throw new SereError('BAD_OPTION', `a block size of ${side} is larger than the sites' extent (${extent} ${unit}): every site would fall in one block`,
      place, `give a block size below ${extent}, or leave it out to choose it from the data`);
  }
}

/**
 * The blocks for sites at `positions` whose latest states are `latest`: of the given side, or
 * BLOCK_RANGES times the states' range of autocorrelation (spatial-range.ts; Lahiri 2003, ch. 12,
 * on blocks that must outgrow the range of dependence). Undefined with one state only
 * and no side given: there is no correlation to measure, and every site is then its own block.
 */
export function chooseBlocks(positions: Float64Array, latest: ArrayLike<number>, k: number, given: number | undefined, place: Place): SpatialBlocks | undefined {
  const extent = extentOf(positions);
  if (given !== undefined) {
    checkBlockSide(given, extent, place);
    return { side: given, chosenBy: 'given', blocks: blockUnits(positions, given).count };
  }
  const estimate = estimateRange(positions, latest, k);
  if (estimate === undefined) return undefined;
  const side = Math.min(BLOCK_RANGES * estimate.range, extent);
  const { range, reached, spacing, sites } = estimate;
  return { side, chosenBy: 'range', range: { range, reached, spacing, sites, edgeLag: edgeLag(estimate) }, blocks: blockUnits(positions, side).count };
}

/**
 * The edge-bias correction of the block bootstrap: resampled blocks lose the covariance of sites on
 * either side of their edges, so the bootstrap's variance is about (1 − m/side)² of the data's
 * (spatial-range.ts edgeLag, m the correlogram's mean edge distance; Künsch 1989, Lahiri 2003 ch. 3
 * for the first-order bias). bootstrap.ts scales every draw's departure from the full-data MLE by
 * 1/(1 − m/side), which restores it to first order. The kept share is floored at ¼ (a factor 2 at
 * most: blocks barely wider than the dependence are better made larger than corrected). 1 — no
 * correction — for a side given by the user (no correlogram) and for fit files written before it.
 * Measured (test/slow/block-bootstrap-coverage.test.ts): 90% bands covered 83% of the time without it.
 */
export function edgeCorrection(blocks: SpatialBlocks): number {
  const m = blocks.range?.edgeLag;
  if (m === undefined || !(m > 0)) return 1;
  return 1 / Math.sqrt(Math.max(0.25, (1 - m / blocks.side) ** 2));
}

/** The blocks as fit and forecast JSON give them: side and its unit, how chosen (with the range behind it), how many. */
export function blocksJson(b: SpatialBlocks, raster: boolean): { side: number; unit: string; chosen_by: string; range: object | null; blocks: number } {
  return {
    side: b.side,
    unit: raster ? 'pixels' : 'projected units',
    chosen_by: b.chosenBy,
    range: b.range ? { range: b.range.range, reached: b.range.reached, spacing: b.range.spacing, sites: b.range.sites, ...(b.range.edgeLag !== undefined ? { edge_lag: b.range.edgeLag } : {}) } : null,
    blocks: b.blocks,
  };
}

/** What the user should hear about the blocks: the size, how it was chosen, how many; a warning when few. */
export function blockNotes(blocks: SpatialBlocks, unit = ''): string[] {
  const how = blocks.chosenBy === 'given' ? 'as given'
    : blocks.range!.reached ? `twice the range of spatial autocorrelation of the latest states: correlation below 0.05 at ${round(blocks.range!.range)}${unit}`
      : `twice the range of spatial autocorrelation at least: the correlation stayed above 0.05 up to half the extent, ${round(blocks.range!.range)}${unit}`;
  const widen = edgeCorrection(blocks);
  const notes = [`spatial block bootstrap: blocks of side ${round(blocks.side)}${unit} (${how}), ${blocks.blocks} blocks` +
    (widen === 1 ? (blocks.chosenBy === 'given' ? '; no edge correction for a side given' : '')
      : `; bands widened (each draw's departure from the estimate ×${widen.toFixed(2)}) for the neighbours split across block edges`)];
  if (blocks.blocks < FEW_BLOCKS) {
    notes.push(`only ${blocks.blocks} blocks (below ${FEW_BLOCKS}): the bands rest on few independent pieces and are themselves uncertain; ` +
      `a smaller ${settingName('--block-size', 'uncertainty.block_size')} gives more blocks but, below the range, narrower bands than the data support`);
  }
  return notes;
}

function round(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

/**
 * A raster's block side, in whole pixels: as given, or BLOCK_RANGES times the range of the latest
 * map's states on a sample of it (data/raster/latest-sample.ts); at least one pixel. A given side
 * must be positive and no larger than the map.
 */
export function rasterBlockChoice(sample: { positions: Float64Array; states: Int32Array; k: number; width: number; height: number },
  given: number | undefined, place: Place): BlockChoice {
  const extent = Math.max(sample.width, sample.height);
  if (given !== undefined) {
    checkBlockSide(given, extent, place, 'pixels');
    return { side: given, chosenBy: 'given' };
  }
  const estimate = sample.k > 1 ? estimateRange(sample.positions, sample.states, sample.k) : undefined;
  if (!estimate) return { side: 1, chosenBy: 'range' };
  const { range, reached, spacing, sites } = estimate;
  return { side: Math.min(extent, Math.max(1, Math.ceil(BLOCK_RANGES * range))), chosenBy: 'range', range: { range, reached, spacing, sites, edgeLag: edgeLag(estimate) } };
}
