import { afterAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { countRasterStack } from '../../../src/data/raster/count-stack.js';
import { sampleLatestMap } from '../../../src/data/raster/latest-sample.js';
import { fitRasterCounts } from '../../../src/fit/fit-from-raster.js';
import { fitSurvey, siteCount } from '../../../src/fit/fit.js';
import { readSurveyCsv } from '../../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../../src/data/survey.js';
import type { FitSettings } from '../../../src/fit/settings.js';
import { estimateFit } from '../../../src/fit/estimate.js';
import { fitToJson } from '../../../src/fit/fit-json.js';
import { loadFit } from '../../../src/fit/load-fit.js';
import { rasterBlockChoice } from '../../../src/fit/spatial-blocks.js';
import { bootstrapDraws } from '../../../src/uncertainty/bootstrap.js';
import { randomStreams } from '../../../src/uncertainty/random.js';
import { LANDSCAPE_STATES } from '../../../scripts/raster/landscape.js';
import { errorOf } from '../../helpers.js';
import { smallStack, stackAsCsv, tempFolder } from './raster-fixtures.js';
import { writeFileSync } from 'node:fs';

const temp = tempFolder('sere-raster-blocks-');
afterAll(() => temp.remove());
const STATES = LANDSCAPE_STATES.slice(0, 4);
const YEARS = [2010, 2011, 2012, 2014, 2015, 2016];
const settings: FitSettings = { step: 1, prior: 'jeffreys', impossible: [], states: STATES, columns: DEFAULT_COLUMNS };

describe('raster stacks counted in blocks', () => {
  it('count each block\'s transitions as the pixels\' own surveys give them, within bounded memory', async () => {
    const stack = smallStack(temp.folder);
    const side = 6;
    const counted = await countRasterStack(stack, { blocks: { side, chosenBy: 'given' }, windowPixels: 37 * 5 });
    const fit = fitRasterCounts(counted, settings);
    // 37 × 29 pixels in blocks of 6: 7 × 5 blocks, every one holding valid pixels.
    expect(fit.spatial).toEqual({ side: 6, chosenBy: 'given', blocks: 35 });
    expect(fit.sites.length).toBe(35);
    expect(fit.blockSites!.reduce((a, b) => a + b, 0)).toBe(siteCount(fit));

    // The same pixels as a long table: each pixel's transitions added up by block (px{row}_{col}).
    const csv = join(temp.folder, 'pixels.csv');
    await stackAsCsv(temp.folder, YEARS, csv);
    const table = fitSurvey(readSurveyCsv(csv, { columns: DEFAULT_COLUMNS, states: STATES }), settings);
    const k = STATES.length;
    const byBlock = new Map<string, Float64Array>();
    const gapsByBlock = new Map<string, Float64Array>();
    table.sites.ids.forEach((id, s) => {
      const [row, col] = id.slice(2).split('_').map(Number) as [number, number];
      const key = `block:${Math.floor(row / side)}:${Math.floor(col / side)}`;
      if (!byBlock.has(key)) { byBlock.set(key, new Float64Array(k * k)); gapsByBlock.set(key, new Float64Array(4 * k * k)); }
      table.sites.addTo(byBlock.get(key)!, s);
      table.siteGaps!.addTo(gapsByBlock.get(key)!, s);
    });
    fit.sites.ids.forEach((id, b) => {
      const one = new Float64Array(k * k);
      fit.sites.addTo(one, b);
      expect(Array.from(one)).toEqual(Array.from(byBlock.get(id) ?? new Float64Array(k * k)));
      const gaps = new Float64Array(4 * k * k);
      fit.siteGaps!.addTo(gaps, b);
      expect(Array.from(gaps)).toEqual(Array.from(gapsByBlock.get(id)!));
    });
  });

  it('support the bootstrap, and keep their blocks in the fit file (the same draws read back)', async () => {
    const stack = smallStack(join(temp.folder, 'b'));
    const plain = fitRasterCounts(await countRasterStack(stack), settings);
    expect(errorOf(() => bootstrapDraws(plain, 10, randomStreams(1))).code).toBe('NO_SITE_COUNTS');
    const fit = fitRasterCounts(await countRasterStack(stack, { blocks: { side: 5, chosenBy: 'given' } }), settings);
    const draws = bootstrapDraws(fit, 100, randomStreams(4));
    expect(draws.notes[0]).toContain('blocks of side 5 pixels');
    const file = join(temp.folder, 'fit.json');
    writeFileSync(file, JSON.stringify(fitToJson(fit, estimateFit(fit, 0.9))));
    const loaded = loadFit(file);
    expect(siteCount(loaded)).toBe(siteCount(fit));
    expect(loaded.spatial).toEqual(fit.spatial);
    expect(Array.from(bootstrapDraws(loaded, 100, randomStreams(4)).data)).toEqual(Array.from(draws.data));
  });

  it('choose the side from a sample of the latest map, and refuse a bad given side', async () => {
    const stack = smallStack(join(temp.folder, 'c'));
    const sample = await sampleLatestMap(stack);
    // 37 × 29: the centred 29 × 29 square, every pixel (lattice step 1), nodata and cloud left out.
    expect(sample.positions.length / 2).toBeLessThanOrEqual(29 * 29);
    expect(sample.k).toBeGreaterThan(1);
    const choice = rasterBlockChoice(sample, undefined, { path: '--block-size' });
    expect(choice.chosenBy).toBe('range');
    expect(choice.side).toBe(Math.min(37, Math.max(1, Math.ceil(2 * choice.range!.range))));
    for (const bad of [0, -1, Number.NaN, 38]) {
      const err = errorOf(() => rasterBlockChoice(sample, bad, { path: '--block-size' }));
      expect([err.code, err.place.path]).toEqual(['BAD_OPTION', '--block-size']);
    }
  });
});
