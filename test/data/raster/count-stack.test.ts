import { afterAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { join } from 'node:path';
import { writeFileSync } from 'node:fs';
import { countRasterStack } from '../../../src/data/raster/count-stack.js';
import { fitRasterCounts } from '../../../src/fit/fit-from-raster.js';
import { fitSurvey, siteCount, type Fit } from '../../../src/fit/fit.js';
import { readSurveyCsv } from '../../../src/data/read-survey-csv.js';
import { groupOf } from '../../../src/fit/fit-from-file.js';
import { DEFAULT_COLUMNS } from '../../../src/data/survey.js';
import type { FitSettings } from '../../../src/fit/settings.js';
import { SereError } from '../../../src/errors.js';
import { StripTiffWriter, projectedGeoKeys } from '../../../src/report/geotiff-writer.js';
import { LANDSCAPE_STATES } from '../../../scripts/raster/landscape.js';
import { smallStack, stackAsCsv, tempFolder } from './raster-fixtures.js';

const temp = tempFolder('sere-raster-count-');
afterAll(() => temp.remove());
const STATES = LANDSCAPE_STATES.slice(0, 4);
const YEARS = [2010, 2011, 2012, 2014, 2015, 2016];

function settings(step: number, group?: string): FitSettings {
  return { step, prior: 'jeffreys', impossible: [], states: STATES, columns: { ...DEFAULT_COLUMNS, group: 'zone' }, group };
}

/** Everything a fit holds that a long table and a raster stack must agree on. */
/** The surveyed mix; a raster fit keeps no pixel's last survey, so it carries none forward (fit-table says so). */
function surveyedMix(latest: Fit['latest']): object {
  const { carried: _carried, notCarried: _notCarried, ...surveyed } = latest;
  return surveyed;
}

function comparable(fit: Fit): object {
  return {
    states: fit.states, counts: Array.from(fit.counts), transitions: fit.transitions, skipped: fit.skipped, gapCounts: fit.gapCounts,
    surveys: fit.surveys, firstTime: fit.firstTime, latest: surveyedMix(fit.latest), pairsByGap: fit.pairsByGap, history: fit.history, periods: fit.periods,
    sites: siteCount(fit),
    triples: [...(fit.triples ?? [])].sort((a, b) => a[0] - b[0] || a[1] - b[1] || a[2] - b[2]),
  };
}

async function expectCode(promise: Promise<unknown>, code: string): Promise<SereError> {
  const err = await promise.then(() => undefined, (e: unknown) => e);
  expect(err).toBeInstanceOf(SereError);
  expect((err as SereError).code).toBe(code);
  return err as SereError;
}

describe('counting a raster stack', () => {
  const folder = join(temp.folder, 'stack');
  const stack = smallStack(folder);
  const csv = join(temp.folder, 'pixels.csv');

  it('gives the same counts as the same pixels written as a long table (one site per pixel) — every step, gap and zone', async () => {
    await stackAsCsv(folder, YEARS, csv);
    const counted = await countRasterStack(stack);
    const table = readSurveyCsv(csv, { columns: settings(1).columns, states: STATES });
    const fromRaster = fitRasterCounts(counted, settings(1));
    expect(fromRaster.transitions).toBeGreaterThan(2000);
    expect(comparable(fromRaster)).toEqual(comparable(fitSurvey(table, settings(1))));
    // Years one apart are not whole 2-year steps: the same refusal from both.
    const codeOf = (f: () => unknown): string | undefined => { try { f(); } catch (e) { return (e as SereError).code; } return undefined; };
    expect(codeOf(() => fitRasterCounts(counted, settings(2)))).toBe('GAP_NOT_WHOLE_STEPS');
    expect(codeOf(() => fitSurvey(table, settings(2)))).toBe('GAP_NOT_WHOLE_STEPS');
    // The lake (nodata) and the cloud (a class mapped to skip) are unsurveyed years: their pixels' pairs span them.
    expect(fromRaster.pairsByGap!.find((s) => s.gap === 2)!.pairs).toBeGreaterThan(0);
    for (const zone of ['10', '20', '30', '40']) {
      expect(comparable(fitRasterCounts(counted, settings(1, zone)))).toEqual(comparable(fitSurvey(groupOf(table, zone, 'zone'), settings(1))));
    }
    expect(counted.grid.pixelArea).toBe(900);
    expect(counted.zones).toEqual([10, 20, 30, 40]);
  });

  it('holds counts only: no per-site table, whatever the number of pixels', async () => {
    const big = smallStack(join(temp.folder, 'big'), { width: 370, height: 290 });
    const [a, b] = [fitRasterCounts(await countRasterStack(stack), settings(1)), fitRasterCounts(await countRasterStack(big), settings(1))];
    expect(a.sites.length).toBe(0);
    expect(b.sites.length).toBe(0);
    expect(b.transitions).toBeGreaterThan(50 * a.transitions);
    expect(b.counts.length).toBe(a.counts.length);
  });

  it('reads a raster in bands of whole strips: a one-row-per-strip stack counts the same', async () => {
    const strips = smallStack(join(temp.folder, 'strips'), { rowsPerStrip: 1 });
    const whole = comparable(fitRasterCounts(await countRasterStack(stack), settings(1)));
    expect(comparable(fitRasterCounts(await countRasterStack(strips), settings(1)))).toEqual(whole);
    // One strip per window: 29 windows of one row.
    const narrow = await countRasterStack(strips, { windowPixels: 37 });
    expect(narrow.bandPixels).toBe(37);
    expect(comparable(fitRasterCounts(narrow, settings(1)))).toEqual(whole);
  });

  it('without labels, each class code is its own state, in numeric order', async () => {
    const raw = join(folder, 'raw.yaml');
    writeFileSync(raw, 'rasters:\n  2010: lc2010.tif\n  2011: lc2011.tif\n');
    const fit = fitRasterCounts(await countRasterStack(raw), { ...settings(1), states: undefined });
    expect(fit.states).toEqual(['1', '2', '3', '4']);
  });

  it('finds rasters by a file-name pattern, and names a missing year', async () => {
    const byPattern = join(folder, 'pattern.yaml');
    writeFileSync(byPattern, 'pattern: lc{year}.tif\nlabels: { 1: bare, 2: sward, 3: heath, 4: scrub, 200: skip }\n');
    const counted = await countRasterStack(byPattern);
    expect(counted.years).toEqual(YEARS);
    const missing = join(folder, 'missing.yaml');
    writeFileSync(missing, 'pattern: lc{year}.tif\nyears: [2010, 2011, 2013]\n');
    const err = await expectCode(countRasterStack(missing), 'FILE_NOT_FOUND');
    expect(err.place).toMatchObject({ line: 2, path: 'years.2' });
  });

  it('reads its labels from a label-map file (the --labels format) as from the same labels inline', async () => {
    const inline = join(folder, 'inline.yaml');
    writeFileSync(inline, 'pattern: lc{year}.tif\nlabels: { 1: bare, 2: sward, 3: heath, 4: scrub, 200: skip }\n');
    writeFileSync(join(folder, 'codes.yaml'), '1: bare\n2: sward\n3: heath\n4: scrub\n200: skip\n');
    const fromFile = join(folder, 'from-file.yaml');
    writeFileSync(fromFile, 'pattern: lc{year}.tif\nlabels: codes.yaml\n');
    const [a, b] = [await countRasterStack(inline), await countRasterStack(fromFile)];
    expect(comparable(fitRasterCounts(b, settings(1)))).toEqual(comparable(fitRasterCounts(a, settings(1))));
    // The label map's bytes are part of the stack's hash.
    expect(b.sha256).not.toBe(a.sha256);
    writeFileSync(join(folder, 'words.yaml'), '1: bare\nheather: heath\n');
    const worded = join(folder, 'worded.yaml');
    writeFileSync(worded, 'pattern: lc{year}.tif\nlabels: words.yaml\n');
    expect((await expectCode(countRasterStack(worded), 'BAD_RASTER')).place).toMatchObject({ line: 2 });
    const absent = join(folder, 'absent.yaml');
    writeFileSync(absent, 'pattern: lc{year}.tif\nlabels: nowhere.yaml\n');
    expect((await expectCode(countRasterStack(absent), 'FILE_NOT_FOUND')).place).toMatchObject({ line: 2, path: 'labels' });
  });

  it('refuses a missing raster file, a class code not in labels and a label key given twice', async () => {
    const gone = join(folder, 'gone.yaml');
    writeFileSync(gone, 'rasters:\n  2010: lc2010.tif\n  2011: lc2099.tif\n');
    expect((await expectCode(countRasterStack(gone), 'FILE_NOT_FOUND')).place).toMatchObject({ line: 3, path: 'rasters.2011' });
    const unmapped = join(folder, 'unmapped.yaml');
    writeFileSync(unmapped, 'rasters: { 2010: lc2010.tif, 2011: lc2011.tif }\nlabels: { 1: bare, 2: sward, 3: heath }\n');
    await expectCode(countRasterStack(unmapped), 'UNKNOWN_STATE');
    const twice = join(folder, 'twice.yaml');
    writeFileSync(twice, 'rasters: { 2010: lc2010.tif, 2011: lc2011.tif }\nlabels: { 1: bare, 01: sward }\n');
    // YAML reads 01 as 1: the yaml library's duplicate-key check names it.
    expect((await expectCode(countRasterStack(twice), 'BAD_YAML')).place).toMatchObject({ line: 2 });
  });

  it('refuses a float raster, a geographic CRS and grids that differ, naming both files', async () => {
    const geo = { pixelScale: [30, 30, 0], tiepoint: [0, 0, 0, 500000, 6000000, 0], geoKeys: projectedGeoKeys(32631) };
    const write = (name: string, kind: 'uint8' | 'float32', width: number, keys = geo): void => {
      const w = new StripTiffWriter(join(folder, name), { width, height: 29, kind, geo: keys, rowsPerStrip: 29 });
      w.writeRows(kind === 'uint8' ? new Uint8Array(width * 29).fill(1) : new Float32Array(width * 29).fill(0.5));
      w.finish();
    };
    write('float.tif', 'float32', 37);
    write('geographic.tif', 'uint8', 37, { ...geo, pixelScale: [0.001, 0.001, 0], geoKeys: [1, 1, 0, 2, 1024, 0, 1, 2, 2048, 0, 1, 4326] });
    write('wider.tif', 'uint8', 38);
    write('elsewhere.tif', 'uint8', 37, { ...geo, geoKeys: projectedGeoKeys(32632) });
    const stackOf = (second: string): string => {
      const file = join(folder, `with-${second}.yaml`);
      writeFileSync(file, `rasters:\n  2010: lc2010.tif\n  2011: ${second}\nlabels: { 1: bare, 2: sward, 3: heath, 4: scrub, 200: skip }\n`);
      return file;
    };
    expect((await expectCode(countRasterStack(stackOf('float.tif')), 'BAD_RASTER')).place.file).toMatch(/float\.tif$/);
    expect((await expectCode(countRasterStack(stackOf('geographic.tif')), 'BAD_RASTER')).place.file).toMatch(/geographic\.tif$/);
    const wider = await expectCode(countRasterStack(stackOf('wider.tif')), 'GRID_MISMATCH');
    expect(wider.place.file).toMatch(/wider\.tif$/);
    expect(wider.message).toContain('lc2010.tif');
    await expectCode(countRasterStack(stackOf('elsewhere.tif')), 'GRID_MISMATCH');
  });

  it('property: for random sizes, survey years, strips and seeds, the stack and the long table give the same fit', async () => {
    let run = 0;
    await fc.assert(fc.asyncProperty(
      fc.integer({ min: 1, max: 23 }), fc.integer({ min: 1, max: 19 }),
      fc.uniqueArray(fc.integer({ min: 2000, max: 2012 }), { minLength: 2, maxLength: 5 }),
      fc.integer({ min: 1, max: 7 }), fc.integer({ min: 1, max: 1000 }), fc.integer({ min: 1, max: 3 }),
      async (width, height, years, rowsPerStrip, seed, step) => {
        const dir = join(temp.folder, `prop${run++}`);
        const sorted = [...years].sort((a, b) => a - b);
        const file = smallStack(dir, { width, height, years: sorted, rowsPerStrip, seed });
        await stackAsCsv(dir, sorted, join(dir, 'pixels.csv'));
        const table = readSurveyCsv(join(dir, 'pixels.csv'), { columns: settings(1).columns, states: STATES });
        const counted = await countRasterStack(file, { windowPixels: width * rowsPerStrip });
        const fromTable = (): Fit => fitSurvey(table, settings(step));
        let expected: object | string;
        try { expected = comparable(fromTable()); } catch (err) { expected = (err as SereError).code; }
        let actual: object | string;
        try { actual = comparable(fitRasterCounts(counted, settings(step))); } catch (err) { actual = (err as SereError).code; }
        expect(actual).toEqual(expected);
      }), { numRuns: 25, seed: 20261202 });
  });
});
