import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fromFile } from 'geotiff';
import { writeLandscape, LANDSCAPE_STATES, NODATA, CLOUD, type LandscapeOptions } from '../../../scripts/raster/landscape.js';

/** A fresh temporary folder, removed by the returned function. */
export function tempFolder(prefix: string): { folder: string; remove: () => void } {
  const folder = mkdtempSync(join(tmpdir(), prefix));
  return { folder, remove: () => rmSync(folder, { recursive: true, force: true }) };
}

/** A small invented stack (scripts/raster/landscape.ts) in `folder`; returns the stack file. */
export function smallStack(folder: string, extra: Partial<LandscapeOptions> = {}): string {
  return writeLandscape({ folder, width: 37, height: 29, years: [2010, 2011, 2012, 2014, 2015, 2016], k: 4, seed: 5, zones: true, rowsPerStrip: 5, ...extra });
}

/**
 * The same pixels as a long survey table, read back with the geotiff package on its own (whole
 * images, not bands): one site per pixel, one row per year it holds a class (nodata and cloud
 * left out), with the zone as a group column.
 */
export async function stackAsCsv(folder: string, years: readonly number[], out: string): Promise<void> {
  const read = async (file: string): Promise<ArrayLike<number> & { width: number }> => {
    const tiff = await fromFile(file);
    const image = await tiff.getImage();
    const data = await image.readRasters({ interleave: true });
    await tiff.close();
    return Object.assign(data as unknown as ArrayLike<number>, { width: image.getWidth() });
  };
  const zones = await read(join(folder, 'zones.tif'));
  const lines = ['site,time,state,zone'];
  for (const year of years) {
    const map = await read(join(folder, `lc${year}.tif`));
    for (let p = 0; p < map.length; p++) {
      const v = map[p]!;
      if (v === NODATA || v === CLOUD) continue;
      lines.push(`px${Math.floor(p / map.width)}_${p % map.width},${year},${LANDSCAPE_STATES[v - 1]},${zones[p]}`);
    }
  }
  writeFileSync(out, lines.join('\n') + '\n');
}
