/**
 * An invented landscape as a stack of classified GeoTIFFs: no real place, map or data. A smooth
 * field of sine waves (with the run's random phases) is cut into classes for the first year; each
 * later year every pixel moves by a stated "true" transition matrix; a round lake is nodata in
 * every year and a band of cloud (a class mapped to skip) hides part of one year. Written strip
 * by strip, so a 10,000 × 10,000 stack needs no more memory than a small one.
 *
 *   node dist/scripts/raster/landscape.js OUT_FOLDER [WIDTH HEIGHT] [SEED]
 *
 * Tests build small stacks with it at run time; the raster bench builds two 10⁸-pixel maps.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { randomStreams } from '../../src/uncertainty/random.js';
import { StripTiffWriter, projectedGeoKeys } from '../../src/report/geotiff-writer.js';

/** Invented class names (terms of the trade), for codes 1, 2, … */
export const LANDSCAPE_STATES = ['bare', 'sward', 'heath', 'scrub', 'thicket', 'woodland', 'fen', 'carr'];
export const NODATA = 255;
/** Cloud: a class code the stack's labels map to skip. */
export const CLOUD = 200;
/** WGS 84 / UTM zone 31N: an open-standard projected CRS in metres (no place is depicted). */
export const LANDSCAPE_EPSG = 32631;

export interface LandscapeOptions {
  readonly folder: string;
  readonly width: number;
  readonly height: number;
  readonly years: readonly number[];
  /** Classes (codes 1 … k); at most LANDSCAPE_STATES.length. */
  readonly k: number;
  readonly seed: number;
  /** Pixel size in metres (default 30). */
  readonly pixel?: number;
  /** Also write zones.tif (four zones: codes 10, 20, 30, 40 in quadrants) and name it in the stack. */
  readonly zones?: boolean;
  /** Leave out the lake and the cloud (every pixel valid every year). */
  readonly complete?: boolean;
  readonly rowsPerStrip?: number;
}

/** A stated k×k row-stochastic matrix: mostly staying put, drifting up the class order. */
export function landscapeTruth(k: number): Float64Array {
  const p = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) p[i * k + j] = i === j ? 8 : j === i + 1 ? 1.5 : j === (i + k - 1) % k ? 0.5 : 0.05;
    let sum = 0;
    for (let j = 0; j < k; j++) sum += p[i * k + j]!;
    for (let j = 0; j < k; j++) p[i * k + j]! /= sum;
  }
  return p;
}

/** Write lc{year}.tif for each year (and zones.tif) and stack.yaml into `folder`; returns the stack file. */
export function writeLandscape(o: LandscapeOptions): string {
  const { width, height, years, k } = o;
  const pixel = o.pixel ?? 30;
  mkdirSync(o.folder, { recursive: true });
  const random = randomStreams(o.seed).stream('landscape');
  const phases = Array.from({ length: 6 }, () => random.uniform() * 2 * Math.PI);
  const moves = random.stream('moves');
  const truth = landscapeTruth(k);
  const rowsPerStrip = o.rowsPerStrip ?? 16;
  // Upper-left corner at an invented easting/northing (metres), north up.
  const geo = { pixelScale: [pixel, pixel, 0], tiepoint: [0, 0, 0, 500000, 6000000, 0], geoKeys: projectedGeoKeys(LANDSCAPE_EPSG) };
  const writers = years.map((year) => new StripTiffWriter(join(o.folder, `lc${year}.tif`), { width, height, kind: 'uint8', nodata: NODATA, geo, rowsPerStrip }));
  const zoneWriter = o.zones ? new StripTiffWriter(join(o.folder, 'zones.tif'), { width, height, kind: 'uint16', nodata: 0, geo, rowsPerStrip }) : undefined;
  const band = rowsPerStrip * 64;
  const state = new Uint8Array(band * width);
  const out = new Uint8Array(band * width);
  const zone = new Uint16Array(band * width);
  const cx = width * 0.7;
  const cy = height * 0.3;
  const r2 = (Math.min(width, height) * 0.12) ** 2;
  for (let y0 = 0; y0 < height; y0 += band) {
    const rows = Math.min(band, height - y0);
    const n = rows * width;
    for (let p = 0; p < n; p++) {
      const x = p % width;
      const y = y0 + Math.floor(p / width);
      const f = Math.sin(x / width * 7 + phases[0]!) + Math.sin(y / height * 5 + phases[1]!) + Math.sin((x + y) / (width + height) * 11 + phases[2]!)
        + 0.5 * Math.sin(x / width * 23 + phases[3]!) * Math.sin(y / height * 19 + phases[4]!) + 0.3 * (random.uniform() - 0.5);
      state[p] = Math.min(k - 1, Math.max(0, Math.floor((f + 3.2) / 6.4 * k)));
      zone[p] = (x < width / 2 ? 10 : 20) + (y < height / 2 ? 0 : 20);
    }
    years.forEach((_, t) => {
      if (t > 0) {
        for (let p = 0; p < n; p++) {
          const from = state[p]!;
          let u = moves.uniform();
          let to = 0;
          while (to < k - 1 && u >= truth[from * k + to]!) { u -= truth[from * k + to]!; to += 1; }
          state[p] = to;
        }
      }
      for (let p = 0; p < n; p++) {
        const x = p % width;
        const y = y0 + Math.floor(p / width);
        const lake = !o.complete && (x - cx) ** 2 + (y - cy) ** 2 < r2;
        // A band of cloud across the middle year's map.
        const cloud = !o.complete && t === Math.floor(years.length / 2) && y > height * 0.55 && y < height * 0.7 && x > width * 0.1;
        out[p] = lake ? NODATA : cloud ? CLOUD : state[p]! + 1;
      }
      writers[t]!.writeRows(out.subarray(0, n));
    });
    zoneWriter?.writeRows(zone.subarray(0, n));
  }
  for (const w of writers) w.finish();
  zoneWriter?.finish();
  const stack = join(o.folder, 'stack.yaml');
  const labels = [...LANDSCAPE_STATES.slice(0, k).map((s, i) => `  ${i + 1}: ${s}`), `  ${CLOUD}: skip`];
  writeFileSync(stack, [
    '# An invented landscape (scripts/raster/landscape.ts): one classified raster per survey year.',
    'rasters:', ...years.map((y) => `  ${y}: lc${y}.tif`),
    ...(o.zones ? ['zones: zones.tif'] : []),
    'labels:', ...labels, '',
  ].join('\n'));
  return stack;
}

if (process.argv[1]?.endsWith('landscape.js')) {
  const [folder, w, h, seed] = process.argv.slice(2);
  if (!folder) {
    console.error('usage: node dist/scripts/raster/landscape.js OUT_FOLDER [WIDTH HEIGHT] [SEED]');
    process.exit(2);
  }
  const stack = writeLandscape({ folder, width: Number(w ?? 400), height: Number(h ?? 300), years: [2016, 2018, 2020, 2022], k: 5, seed: Number(seed ?? 7), zones: true });
  console.log(`wrote ${stack}`);
}
