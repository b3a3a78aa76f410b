import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { SereError, quote } from '../errors.js';
import { StripTiffWriter, type GeoTags } from './geotiff-writer.js';

/** Written where a pixel has no chance: nodata in the input, a skipped class, or no zone. */
export const MAP_NODATA = -1;
/** Bytes of output rows held at once across all maps (one band of every map). */
const BAND_BYTES = 64 * 1024 * 1024;

/** One band of the latest map, as the maps need it: each pixel's state and chain (−1: none). */
export interface PixelBand {
  readonly state: Int16Array;
  readonly chain: Int16Array;
}

export interface MapJob {
  readonly folder: string;
  readonly width: number;
  readonly height: number;
  readonly geo: GeoTags;
  readonly states: readonly string[];
  /** Calendar years shown (after the latest map). */
  readonly years: readonly number[];
  /** `chances[chain][n]`: k×k mean Pʰ for the n-th shown year, row = state in the latest map. */
  readonly chances: readonly (readonly Float64Array[])[];
  /** The first `rows` … rows of the latest map's states and chains. */
  readBand(y0: number, y1: number): Promise<PixelBand>;
}

/** The map files of a job: one per state and year, named STATE_YEAR.tif (file-safe characters only). */
export function mapFiles(folder: string, states: readonly string[], years: readonly number[]): string[][] {
  const names = states.map((s) => s.replace(/[^A-Za-z0-9_.-]/g, '_'));
  names.forEach((name, n) => {
    const same = names.findIndex((m) => m.toLowerCase() === name.toLowerCase());
    if (same !== n) {
      throw new SereError('BAD_OPTION', `states ${quote(states[same]!)} and ${quote(states[n]!)} would share a map file name`, { path: '--maps' },
        'rename one of them in the stack\'s labels (file names keep only letters, digits, _ . -)');
    }
  });
  return names.map((name) => years.map((year) => join(folder, `${name}_${year}.tif`)));
}

/** Refuse before any work when a map file (or the area CSV) exists and --force was not given. */
export function refuseExistingMaps(files: readonly string[], force: boolean): void {
  if (force) return;
  const existing = files.find((f) => existsSync(f));
  if (existing !== undefined) {
    throw new SereError('FILE_EXISTS', 'already exists and was left untouched (no map was written)', { file: existing },
      'choose another --maps folder, or pass --force to replace the maps');
  }
}

/**
 * Write every probability map band by band: a band of the latest map is read, each pixel's chance
 * of each state in each shown year is looked up in its chain's mean Pʰ, and the band is appended
 * to every map. Memory: one band of each map (BAND_BYTES in all) plus one band of the input.
 */
export async function writeProbabilityMaps(job: MapJob): Promise<string[]> {
  const k = job.states.length;
  const files = mapFiles(job.folder, job.states, job.years);
  const count = k * job.years.length;
  const rows = Math.max(1, Math.min(job.height, Math.floor(BAND_BYTES / (4 * count * job.width))));
  const writers: StripTiffWriter[] = [];
  try {
    for (const perYear of files) {
      for (const file of perYear) {
        writers.push(new StripTiffWriter(file, { width: job.width, height: job.height, kind: 'float32', nodata: MAP_NODATA, geo: job.geo, rowsPerStrip: rows }));
      }
    }
    const out = Array.from({ length: count }, () => new Float32Array(rows * job.width));
    for (let y0 = 0; y0 < job.height; y0 += rows) {
      const y1 = Math.min(job.height, y0 + rows);
      const n = (y1 - y0) * job.width;
      const band = await job.readBand(y0, y1);
      for (let j = 0; j < k; j++) {
        job.years.forEach((_, h) => {
          const target = out[j * job.years.length + h]!;
          const tables = job.chances.map((perStep) => perStep[h]!);
          for (let p = 0; p < n; p++) {
            const s = band.state[p]!;
            const c = band.chain[p]!;
            target[p] = s < 0 || c < 0 ? MAP_NODATA : tables[c]![s * k + j]!;
          }
          writers[j * job.years.length + h]!.writeRows(target.subarray(0, n));
        });
      }
    }
    for (const w of writers) w.finish();
  } catch (err) {
    for (const w of writers) w.abort();
    throw err;
  }
  return files.flat();
}

export interface AreaRow {
  readonly zone: string;
  readonly state: string;
  readonly year: number;
  readonly pixels: number;
  readonly hectares: number;
}

/**
 * Expected area by zone, state and year: for each chain, the pixels of each state in the latest
 * map times that state's row of mean Pʰ — the sum of the maps' pixel values, without reading them
 * back. `latest[chain]` holds the chain's pixels by state; `pixelArea` is in m².
 */
export function expectedAreas(zones: readonly string[], latest: readonly (readonly number[])[], chances: MapJob['chances'],
  states: readonly string[], years: readonly number[], pixelArea: number): AreaRow[] {
  const k = states.length;
  const rows: AreaRow[] = [];
  const total = years.map(() => new Float64Array(k));
  zones.forEach((zone, z) => {
    years.forEach((year, h) => {
      for (let j = 0; j < k; j++) {
        let pixels = 0;
        for (let i = 0; i < k; i++) pixels += latest[z]![i]! * chances[z]![h]![i * k + j]!;
        total[h]![j] += pixels;
        rows.push({ zone, state: states[j]!, year, pixels, hectares: pixels * pixelArea / 1e4 });
      }
    });
  });
  if (zones.length > 1) {
    years.forEach((year, h) => states.forEach((state, j) => {
      rows.push({ zone: 'all', state, year, pixels: total[h]![j]!, hectares: total[h]![j]! * pixelArea / 1e4 });
    }));
  }
  return rows;
}

/** The area table as CSV: zone,state,year,expected_pixels,expected_hectares (README, "Probability maps"). */
export function areaCsv(rows: readonly AreaRow[]): string {
  return stringify([['zone', 'state', 'year', 'expected_pixels', 'expected_hectares'],
    ...rows.map((r) => [r.zone, r.state, r.year, round(r.pixels, 3), round(r.hectares, 4)])]);
}

function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
