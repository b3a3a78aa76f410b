import type { SiteCountTable } from '../chain/site-counts.js';
import { quote } from '../errors.js';
import type { Fail } from './check-fit-file.js';
import type { FitFile } from './fit-file-schema.js';
import { blockUnits, extentOf, type SpatialBlocks } from './spatial-blocks.js';

/** The spatial keys of a fit file, checked: positions aligned with the sites, the blocks' side, a raster's pixels per block. */
export interface CheckedSpatial {
  readonly positions?: Float64Array;
  readonly spatial?: SpatialBlocks;
  readonly blockSites?: Float64Array;
}

/**
 * `site_positions` (`[site, x, y]`, one per site of site_counts, finite numbers) and
 * `spatial_blocks` (side, how it was chosen; for a raster fit `block_sites`, pixels per block
 * aligned with site_counts). Both absent in files without positions, and in files written before
 * the spatial bootstrap: those still read, and their bootstrap resamples sites.
 */
export function checkSpatial(f: FitFile, sites: SiteCountTable | number, fail: Fail): CheckedSpatial {
  const given = f.spatial_blocks ?? undefined;
  if (f.site_positions == null && given === undefined) return {};
  if (typeof sites === 'number') fail('spatial blocks need site_counts, and this fit has pooled counts only', ['spatial_blocks']);
  const table = sites as SiteCountTable;
  const side = given?.side;
  if (given && !(side! > 0)) fail('spatial_blocks.side must be a positive number', ['spatial_blocks', 'side']);
  const range = given?.range ?? undefined;
  const recorded: Omit<SpatialBlocks, 'blocks'> = {
    side: side!, chosenBy: given?.chosen_by ?? 'given',
    ...(range ? { range: { range: range.range, reached: range.reached, spacing: range.spacing, sites: range.sites, ...(range.edge_lag != null ? { edgeLag: range.edge_lag } : {}) } } : {}),
  };
  if (given?.block_sites != null) {
    const blockSites = Float64Array.from(given.block_sites);
    if (blockSites.length !== table.length) fail(`spatial_blocks.block_sites lists ${blockSites.length} blocks, but site_counts has ${table.length}`, ['spatial_blocks', 'block_sites']);
    return { spatial: { ...recorded, blocks: table.length }, blockSites };
  }
  if (f.site_positions == null) fail('spatial_blocks needs site_positions (or block_sites for a raster fit)', ['spatial_blocks']);
  const at = new Map(table.ids.map((id, s) => [id, s] as const));
  const positions = new Float64Array(2 * table.length).fill(Number.NaN);
  f.site_positions!.forEach(([site, x, y], n) => {
    const s = at.get(site.normalize('NFC'));
    if (s === undefined) fail(`site_positions names site ${quote(site)}, which is not in site_counts`, ['site_positions', n, 0]);
    if (!Number.isNaN(positions[2 * s!]!)) fail(`site ${quote(site)} has two positions`, ['site_positions', n, 0]);
    positions[2 * s!] = x;
    positions[2 * s! + 1] = y;
  });
  const missing = positions.findIndex((v) => Number.isNaN(v));
  if (missing >= 0) fail(`site ${quote(table.ids[missing >> 1]!)} has no position in site_positions`, ['site_positions']);
  if (!given) return { positions };
  if (side! > extentOf(positions)) fail(`spatial_blocks.side ${side} is larger than the sites' extent`, ['spatial_blocks', 'side']);
  return { positions, spatial: { ...recorded, blocks: blockUnits(positions, side!).count } };
}
