import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { SereError } from '../errors.js';
import { classLookup, type RasterCounts } from '../data/raster/count-stack.js';
import { geoTagsOf, openRaster } from '../data/raster/open-raster.js';
import { readBand } from '../data/raster/read-band.js';
import { fitRasterZones, rasterSourceOf, rasterStateOrder } from '../fit/fit-from-raster.js';
import type { Fit } from '../fit/fit.js';
import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import type { RandomStream } from '../uncertainty/random.js';
import { meanPlannedPowers } from '../engine/pixel-chances.js';
import { buildPlan } from '../engine/plan.js';
import { areaCsv, expectedAreas, mapFiles, refuseExistingMaps, writeProbabilityMaps } from '../report/probability-maps.js';
import { formatBytes } from '../limits.js';
import { writeFileAtomic } from './write-file.js';
import type { Io } from './io.js';

/** The expected-area table beside the maps. */
export const AREA_CSV = 'expected-area.csv';

/** One line about a counted stack for stderr: grid, pixel area, pixels read, memory held. */
export function stackSummary(counted: RasterCounts, fit: Fit): string {
  const g = counted.grid;
  const hectares = (fit.latest.sites * g.pixelArea) / 1e4;
  return `raster stack ${counted.stack.file}: ${counted.years.length} maps of ${g.width} × ${g.height} pixels of ${g.pixelArea} m²` +
    `${g.epsg !== null ? ` (EPSG:${g.epsg})` : ''}, read in windows of ${counted.bandPixels} pixels (${formatBytes(counted.bandPixels * 12)} of per-pixel state); ` +
    `latest map ${fit.latest.time}: ${fit.latest.sites} pixels, ${round(hectares)} ha (` +
    fit.states.map((state, i) => `${state} ${round((fit.latest.counts[i]! * g.pixelArea) / 1e4)} ha`).join(', ') + ')' +
    (counted.zones ? `; ${counted.zones.length} zones${counted.outsideZones ? `, ${counted.outsideZones} pixels outside every zone left out` : ''}` : '') + '\n';
}

/** The map and CSV files `--maps` will write for a scenario, checked before anything runs. */
export function plannedMaps(scenario: Scenario, folder: string): string[] {
  const years = shownYears(scenario);
  return [...mapFiles(folder, scenario.fit.states, years).flat(), join(folder, AREA_CSV)];
}

function shownYears(scenario: Scenario): number[] {
  return scenario.showSteps.filter((s) => s > 0).map((s) => scenario.start.year + s * scenario.fit.step);
}

/** What `--maps` cannot draw, checked before the forecast runs. */
export function checkMapsScenario(scenarios: readonly Scenario[], folder: string, force: boolean): void {
  if (scenarios.length !== 1) {
    throw new SereError('BAD_OPTION', `--maps draws one scenario's maps, and ${scenarios.length} were given`, { path: '--maps' },
      'run sere forecast --maps with one scenario file without alternatives');
  }
  const scenario = scenarios[0]!;
  if (!rasterSourceOf(scenario.fit)) {
    throw new SereError('BAD_OPTION', '--maps needs a scenario whose data is a raster stack (.yaml)', { file: scenario.file, path: 'data' },
      'name the raster stack file as data');
  }
  const { counted, settings } = rasterSourceOf(scenario.fit)!;
  if (scenario.source === 'bootstrap' && (settings.group !== undefined || counted.zones)) {
    // Blocks are counted over the whole map (data/raster/block-tally.ts); a zone's chain has pooled counts only.
    throw new SereError('BAD_OPTION', 'maps of a stack with zones draw each zone\'s own chain, and the block bootstrap\'s blocks are counted over the whole map',
      { file: scenario.file, path: 'uncertainty.source' }, 'use source: posterior for these maps, or a stack without zones');
  }
  if (scenario.events.some((e) => e.scope === 'landscape')) {
    throw new SereError('BAD_OPTION', '--maps cannot draw landscape-scope events yet (their years are random per draw)', { file: scenario.file, path: 'events' },
      'give the event scope: site, or run --maps with a scenario without it');
  }
  if (scenario.start.from !== 'latest') {
    throw new SereError('BAD_OPTION', '--maps starts from each pixel\'s state in the latest map, and this scenario gives its own start', { file: scenario.file, path: 'start' },
      'use start: latest');
  }
  refuseExistingMaps(plannedMaps(scenario, folder), force);
}

/**
 * Write the probability maps of a scenario fitted to a raster stack, and the expected area by
 * zone: each pixel's chance of each state in each shown year given its state in the latest map
 * (posterior mean of a row of Pʰ; under the scenario's treatments and site events, of the product
 * of its year matrices, mixed over partial-area parcels by area). With zones and no single zone fitted, each zone has its own
 * chain (its own counts, same prior and settings) and its own draws (`maps:zone:CODE`); otherwise
 * the forecast's own draws (the `matrices` stream), so the maps add up to its mean shares.
 */
export async function writeScenarioMaps(scenario: Scenario, folder: string, random: RandomStream, io: Io): Promise<void> {
  const source = rasterSourceOf(scenario.fit)!;
  const { counted, settings } = source;
  const T = counted.years.length;
  const steps = scenario.showSteps.filter((s) => s > 0);
  const years = shownYears(scenario);
  const { states, index } = rasterStateOrder(counted, settings);
  const k = states.length;
  const zoneChains: { zone: number; fit: Fit; stream: RandomStream }[] = [];
  if (settings.group !== undefined) zoneChains.push({ zone: Number(settings.group), fit: scenario.fit, stream: random.stream('matrices') });
  else if (counted.zones) {
    for (const { zone, fit } of fitRasterZones(counted, settings)) zoneChains.push({ zone, fit, stream: random.stream(`maps:zone:${zone}`) });
  }
  const chains = zoneChains.length > 0 ? zoneChains : [{ zone: -1, fit: scenario.fit, stream: random.stream('matrices') }];
  // Treatments and site events act on every chain as on the forecast's (same states, same recipes).
  const plan = buildPlan(scenario);
  const chances = chains.map((c) => meanPlannedPowers(plan, drawMatrices(c.fit, scenario.source, scenario.draws, c.stream), steps));
  // Pixels by state in the latest map, per chain, in the fit's state order.
  const latest = chains.map((c) => {
    const mix = new Array<number>(k).fill(0);
    const tallies = c.zone >= 0 ? [counted.tallies[counted.zones!.indexOf(c.zone)]!] : counted.tallies;
    const kc = counted.states.length;
    for (const tally of tallies) for (let s = 0; s < kc; s++) mix[index[s]!]! += tally.history[(T - 1) * kc + s]!;
    return mix;
  });
  const last = counted.stack.rasters[T - 1]!;
  const raster = await openRaster(last.file, counted.stack.locate(last.path));
  const zoneRaster = counted.stack.zones && chains[0]!.zone >= 0 ? await openRaster(counted.stack.zones, counted.stack.locate(['zones']), 'zone') : undefined;
  const lut = classLookup(counted);
  const chainOfZone = new Map(chains.map((c, n) => [c.zone, n]));
  mkdirSync(folder, { recursive: true });
  try {
    const files = await writeProbabilityMaps({
      folder, width: counted.grid.width, height: counted.grid.height, geo: await geoTagsOf(raster), states, years, chances,
      async readBand(y0, y1) {
        const codes = await readBand(raster, y0, y1);
        const zones = zoneRaster ? await readBand(zoneRaster, y0, y1) : undefined;
        const n = (y1 - y0) * counted.grid.width;
        const state = new Int16Array(n);
        const chain = new Int16Array(n);
        for (let p = 0; p < n; p++) {
          const v = codes[p]!;
          const s = v === raster.nodata ? -1 : lut[v & 0xffff]!;
          state[p] = s < 0 ? -1 : index[s]!;
          chain[p] = zones ? (zones[p] === zoneRaster!.nodata ? -1 : chainOfZone.get(zones[p]!) ?? -1) : 0;
        }
        return { state, chain };
      },
    });
    const zoneNames = chains.map((c) => (c.zone >= 0 ? String(c.zone) : 'all'));
    const csv = areaCsv(expectedAreas(zoneNames, latest, chances, states, years, counted.grid.pixelArea));
    writeFileAtomic(join(folder, AREA_CSV), csv, true);
    io.stderr(`wrote ${files.length} probability maps and ${AREA_CSV} to ${folder}\n`);
  } finally {
    void raster.tiff.close();
    if (zoneRaster) void zoneRaster.tiff.close();
  }
}

function round(x: number): number {
  return Math.round(x * 100) / 100;
}
