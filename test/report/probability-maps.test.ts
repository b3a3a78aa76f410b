import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { spawnSync } from 'node:child_process';
import { fromFile } from 'geotiff';
import { matrix, pow } from 'mathjs';
import { sereInProcess } from '../cli/in-process.js';
import { smallStack, stackAsCsv, tempFolder } from '../data/raster/raster-fixtures.js';
import { LANDSCAPE_STATES, NODATA } from '../../scripts/raster/landscape.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { fitSurvey, fitMle } from '../../src/fit/fit.js';
import { groupOf } from '../../src/fit/fit-from-file.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { countRasterStack } from '../../src/data/raster/count-stack.js';
import { gridDifference } from '../../src/data/raster/open-raster.js';

const temp = tempFolder('sere-maps-');
afterAll(() => temp.remove());
const STATES = LANDSCAPE_STATES.slice(0, 4);
const YEARS = [2010, 2011, 2012, 2014, 2015, 2016];
/** Float32 keeps about 7 significant digits; values are chances in [0, 1]. */
const FLOAT32_TOLERANCE = 1e-6;

async function readMap(file: string): Promise<{ values: Float32Array; width: number; origin: number[]; resolution: number[]; keys: unknown; nodata: number | null }> {
  const tiff = await fromFile(file);
  const image = await tiff.getImage();
  const values = (await image.readRasters({ interleave: true })) as unknown as Float32Array;
  const out = { values, width: image.getWidth(), origin: image.getOrigin(), resolution: image.getResolution(), keys: image.getGeoKeys(), nodata: image.getGDALNoData() };
  await tiff.close();
  return out;
}

async function readCodes(file: string): Promise<ArrayLike<number>> {
  const tiff = await fromFile(file);
  const data = (await (await tiff.getImage()).readRasters({ interleave: true })) as unknown as ArrayLike<number>;
  await tiff.close();
  return data;
}

function scenario(folder: string, name: string, body: string): string {
  const file = join(folder, name);
  writeFileSync(file, `data: stack.yaml\nfit: { step: 1, states: [${STATES.join(', ')}] }\n${body}`);
  return relative(process.cwd(), file);
}

describe('probability maps (sere forecast --maps)', () => {
  const zoned = join(temp.folder, 'zoned');
  smallStack(zoned);
  const plain = join(temp.folder, 'plain');
  smallStack(plain, { zones: false });

  it('each zone\'s map pixel is a row of its own MLE raised to the step (point source), checked against mathjs matrix powers of a fit of the long table', async () => {
    const file = scenario(zoned, 'point.yaml', 'horizon: { steps: 4 }\nshow: [1, 3]\nuncertainty: { source: point }\n');
    const out = relative(process.cwd(), join(zoned, 'maps'));
    const run = await sereInProcess(['forecast', file, '--maps', out]);
    expect(run.code).toBe(0);
    // The independent path: the same pixels as a long table, fitted zone by zone through fitSurvey.
    const csv = join(zoned, 'pixels.csv');
    await stackAsCsv(zoned, YEARS, csv);
    const settings = { step: 1, prior: 'jeffreys' as const, impossible: [], states: STATES, columns: { ...DEFAULT_COLUMNS, group: 'zone' } };
    const table = readSurveyCsv(csv, { columns: settings.columns, states: STATES });
    const k = STATES.length;
    const latest = await readCodes(join(zoned, 'lc2016.tif'));
    const zones = await readCodes(join(zoned, 'zones.tif'));
    for (const [h, year] of [[1, 2017], [3, 2019]] as const) {
      const powers = new Map([10, 20, 30, 40].map((z) => {
        const p = fitMle(fitSurvey(groupOf(table, String(z), 'zone'), settings)).p;
        const rows = Array.from({ length: k }, (_, i) => Array.from(p.subarray(i * k, i * k + k)));
        return [z, (pow(matrix(rows), h) as unknown as { toArray(): number[][] }).toArray()] as const;
      }));
      for (const [j, state] of STATES.entries()) {
        const map = await readMap(join(out, `${state}_${year}.tif`));
        expect(map.nodata).toBe(-1);
        let checked = 0;
        for (let p = 0; p < map.values.length; p++) {
          if (latest[p] === NODATA) { expect(map.values[p]).toBe(-1); continue; }
          expect(Math.abs(map.values[p]! - powers.get(zones[p]!)![latest[p]! - 1]![j]!)).toBeLessThan(FLOAT32_TOLERANCE);
          checked += 1;
        }
        expect(checked).toBeGreaterThan(900);
      }
    }
    // The maps sit on the input's grid, in its CRS.
    const input = await fromFile(join(zoned, 'lc2016.tif'));
    const image = await input.getImage();
    const map = await readMap(join(out, `heath_2019.tif`));
    expect([map.width, map.origin, map.resolution, map.keys]).toEqual([image.getWidth(), image.getOrigin(), image.getResolution(), image.getGeoKeys()]);
    await input.close();
  });

  it('without zones the maps use the forecast\'s own draws: their mean over pixels is the forecast\'s mean share, and the area CSV adds the maps up', async () => {
    const file = scenario(plain, 'posterior.yaml', 'horizon: { steps: 6 }\nshow: [2, 6]\nuncertainty: { draws: 300, seed: 17 }\n' +
      // Year-to-year variation leaves each draw's expected Pʰ unchanged (independent years, mean P), so the
      // maps do not draw it; without it the forecast's mean shares come from exactly the maps' draws.
      'variation: none\n');
    const out = relative(process.cwd(), join(plain, 'maps'));
    const run = await sereInProcess(['forecast', file, '--maps', out, '--json']);
    expect(run.code).toBe(0);
    const json = JSON.parse(run.stdout).scenarios[0] as { years: number[]; shares: Record<string, { mean: number[] }> };
    const area = readFileSync(join(out, 'expected-area.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    const counted = await countRasterStack(join(plain, 'stack.yaml'));
    for (const year of [2018, 2022]) {
      for (const state of STATES) {
        const map = await readMap(join(out, `${state}_${year}.tif`));
        let sum = 0;
        let pixels = 0;
        for (const v of map.values) if (v !== -1) { sum += v; pixels += 1; }
        const t = json.years.indexOf(year);
        expect(sum / pixels).toBeCloseTo(json.shares[state]!.mean[t]!, 5);
        const row = area.find((r) => r[0] === 'all' && r[1] === state && Number(r[2]) === year)!;
        expect(Number(row[3])).toBeCloseTo(sum, 0);
        expect(Number(row[4])).toBeCloseTo(sum * counted.grid.pixelArea / 1e4, 1);
      }
    }
  });

  it('under a partial-area treatment and a site-scope event, the maps still average to the forecast\'s mean shares (the engine\'s own path)', async () => {
    const file = scenario(plain, 'treated.yaml', 'horizon: { steps: 5 }\nshow: [1, 5]\nuncertainty: { draws: 200, seed: 23 }\nvariation: none\n' +
      'treatments: [{ name: clear, state: scrub, set: { bare: 0.4 }, area: 0.3, ramp: 2 }]\n' +
      'events: [{ name: trample, scope: site, chance: 0.2, matrix: { sward: { bare: 1 } } }]\n');
    const out = relative(process.cwd(), join(plain, 'treated-maps'));
    const run = await sereInProcess(['forecast', file, '--maps', out, '--json']);
    expect(run.code).toBe(0);
    const json = JSON.parse(run.stdout).scenarios[0] as { years: number[]; shares: Record<string, { mean: number[] }> };
    for (const year of [2017, 2021]) {
      for (const state of STATES) {
        const map = await readMap(join(out, `${state}_${year}.tif`));
        let sum = 0;
        let pixels = 0;
        for (const v of map.values) if (v !== -1) { sum += v; pixels += 1; }
        expect(sum / pixels).toBeCloseTo(json.shares[state]!.mean[json.years.indexOf(year)]!, 5);
      }
    }
  });

  it('never overwrites maps unasked, and refuses what it cannot draw, with nothing written', async () => {
    const file = scenario(plain, 'again.yaml', 'horizon: { steps: 2 }\nuncertainty: { draws: 50, seed: 3 }\n');
    const out = relative(process.cwd(), join(plain, 'again'));
    expect((await sereInProcess(['forecast', file, '--maps', out])).code).toBe(0);
    const before = statSync(join(out, 'bare_2018.tif')).mtimeMs;
    const again = await sereInProcess(['forecast', file, '--maps', out, '--debug']);
    expect(again.code).toBe(1);
    expect(again.stderr).toContain('[FILE_EXISTS]');
    expect(statSync(join(out, 'bare_2018.tif')).mtimeMs).toBe(before);
    expect((await sereInProcess(['forecast', file, '--maps', out, '--force'])).code).toBe(0);
    // The bootstrap resamples blocks of pixels counted with the stack (the spatial block bootstrap);
    // one zone's fit has pooled counts only, and is refused.
    const boot = scenario(plain, 'boot.yaml', 'horizon: { steps: 2 }\nuncertainty: { source: bootstrap, draws: 50, seed: 3, block_size: 6 }\n');
    const blocks = await sereInProcess(['forecast', boot, '--debug']);
    expect(blocks.code).toBe(0);
    expect(blocks.stdout).toContain('blocks of side 6 pixels (as given), 35 blocks');
    const zone = join(zoned, 'boot-zone.yaml');
    writeFileSync(zone, `data: stack.yaml\nfit: { step: 1, states: [${STATES.join(', ')}], group: "10" }\nhorizon: { steps: 2 }\nuncertainty: { source: bootstrap, draws: 50, seed: 3 }\n`);
    const refused = await sereInProcess(['forecast', relative(process.cwd(), zone), '--debug']);
    expect(refused.code).toBe(1);
    expect(refused.stderr).toContain('[NO_SITE_COUNTS]');
    const stormy = scenario(plain, 'stormy.yaml', 'horizon: { steps: 2 }\nevents: [{ name: fire, chance: 0.1, matrix: { heath: { bare: 1 } } }]\n');
    const noMaps = relative(process.cwd(), join(plain, 'stormy-maps'));
    const t = await sereInProcess(['forecast', stormy, '--maps', noMaps, '--debug']);
    expect(t.code).toBe(1);
    expect(t.stderr).toContain('[BAD_OPTION]');
    expect(() => statSync(noMaps)).toThrow();
  });
});

/** GDAL from Debian packages (.ci/run installs gdal-bin); elsewhere these checks skip, saying so. */
const gdal = spawnSync('gdalinfo', ['--version'], { encoding: 'utf8' }).status === 0;
if (!gdal) console.warn('GDAL checks of the probability maps skipped: no gdalinfo (apt-get install -y gdal-bin)');

describe.skipIf(!gdal)('probability maps read by GDAL', () => {
  it('have the input\'s size, geotransform and CRS, the pixel area sere used, and the pixel values the geotiff package reads', async () => {
    const folder = join(temp.folder, 'gdal');
    smallStack(folder);
    const file = scenario(folder, 'point.yaml', 'horizon: { steps: 2 }\nshow: [2]\nuncertainty: { source: point }\n');
    const out = join(folder, 'maps');
    expect((await sereInProcess(['forecast', file, '--maps', relative(process.cwd(), out)])).code).toBe(0);
    const info = (f: string): { size: number[]; geoTransform: number[]; coordinateSystem: { wkt: string }; bands: { type: string; noDataValue: number }[] } =>
      JSON.parse(spawnSync('gdalinfo', ['-json', f], { encoding: 'utf8' }).stdout);
    const input = info(join(folder, 'lc2016.tif'));
    const map = info(join(out, 'scrub_2018.tif'));
    expect(map.size).toEqual([37, 29]);
    expect(map.geoTransform).toEqual(input.geoTransform);
    expect(map.coordinateSystem.wkt).toBe(input.coordinateSystem.wkt);
    expect(map.coordinateSystem.wkt).toContain('ID["EPSG",32631]');
    expect(map.bands[0]).toMatchObject({ type: 'Float32', noDataValue: -1 });
    const counted = await countRasterStack(join(folder, 'stack.yaml'));
    expect(Math.abs(map.geoTransform[1]! * map.geoTransform[5]!)).toBe(counted.grid.pixelArea);
    const values = (await readMap(join(out, 'scrub_2018.tif'))).values;
    for (const [x, y] of [[0, 0], [5, 3], [36, 28], [25, 8], [12, 20]] as const) {
      const gdalValue = Number(spawnSync('gdallocationinfo', ['-valonly', join(out, 'scrub_2018.tif'), String(x), String(y)], { encoding: 'utf8' }).stdout.trim());
      expect(gdalValue).toBeCloseTo(values[y * 37 + x]!, 6);
    }
    // (25, 8) lies in the invented lake: nodata in the input, nodata in the map.
    expect(values[8 * 37 + 25]).toBe(-1);
  });

  it('reads tiled, compressed inputs (written by gdal_translate) to the same counts as the strip-written originals, also one tile at a time', async () => {
    const folder = join(temp.folder, 'tiled');
    const stack = smallStack(folder);
    const tiled = join(temp.folder, 'tiled-copy');
    spawnSync('mkdir', ['-p', tiled]);
    for (const name of [...YEARS.map((y) => `lc${y}.tif`), 'zones.tif']) {
      const r = spawnSync('gdal_translate', ['-q', '-co', 'TILED=YES', '-co', 'BLOCKXSIZE=16', '-co', 'BLOCKYSIZE=16', '-co', 'COMPRESS=DEFLATE',
        join(folder, name), join(tiled, name)], { encoding: 'utf8' });
      expect(r.status).toBe(0);
    }
    writeFileSync(join(tiled, 'stack.yaml'), readFileSync(stack, 'utf8'));
    const [a, b] = [await countRasterStack(stack), await countRasterStack(join(tiled, 'stack.yaml'))];
    // Windows of one 16 × 16 tile each, as a map wider than a window is read.
    const c = await countRasterStack(join(tiled, 'stack.yaml'), { windowPixels: 256 });
    const tallies = (x: typeof a): unknown => x.tallies.map((t) => [t.pairs.map((m) => (m ? Array.from(m) : null)), Array.from(t.history)]);
    expect(tallies(b)).toEqual(tallies(a));
    expect(tallies(c)).toEqual(tallies(a));
    expect(c.bandPixels).toBe(256);
    // GDAL rewrites the GeoKeys (citations of its own); the grids still match, compared by EPSG code.
    expect(gridDifference(a.grid, b.grid)).toBeUndefined();
    expect([b.grid.pixelArea, b.grid.epsg]).toEqual([900, 32631]);
  });
});
