import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { surveyReadOptions } from '../../src/fit/settings.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { errorOf, tempFiles } from '../helpers.js';

const files = tempFiles('sere-positions-');
const columns = { ...DEFAULT_COLUMNS, x: 'east', y: 'north' };
const read = (text: string, name = 'p.csv') => readSurveyCsv(files.write(name, text), { columns });

describe('site positions (x and y columns)', () => {
  it('keeps one position per site, in the sites\' order, from a long table', () => {
    const table = read('site,time,state,east,north\nb,1,x,10,20.5\na,1,y,-3e2,7\nb,2,x,10,20.5\na,2,x,-300,7.0\n');
    expect(table.sites).toEqual(['a', 'b']);
    expect(Array.from(table.positions!)).toEqual([-300, 7, 10, 20.5]);
  });

  it('reads them from a wide table, where they are not survey times', () => {
    const table = readSurveyCsv(files.write('w.csv', 'site,east,north,2020,2021\nq,1,2,x,y\np,3,4,y,\n'), { columns, layout: 'wide' });
    expect(table.sites).toEqual(['p', 'q']);
    expect(Array.from(table.positions!)).toEqual([3, 4, 1, 2]);
    // Detected as wide too: the position columns are named, so they are not taken for times.
    expect(readSurveyCsv(files.write('w2.csv', 'site,east,north,2020,2021\nq,1,2,x,y\n'), { columns }).rows.count).toBe(2);
  });

  it('is absent without x and y columns, and the fit file then has no spatial keys', () => {
    const table = readSurveyCsv(files.write('n.csv', 'site,time,state,east,north\na,1,x,1,1\na,2,y,1,1\n'), { columns: DEFAULT_COLUMNS });
    expect(table.positions).toBeUndefined();
    const fit = fitSurvey(table, DEFAULT_FIT_SETTINGS);
    const json = fitToJson(fit, estimateFit(fit, 0.9)) as Record<string, unknown>;
    expect('site_positions' in json).toBe(false);
    expect('spatial_blocks' in json).toBe(false);
  });

  it('refuses a coordinate that is not a number, at its line and column', () => {
    const err = errorOf(() => read('site,time,state,east,north\na,1,x,10,20\na,2,x,10,2O\n'));
    expect([err.code, err.place.line, err.place.column]).toEqual(['BAD_COORDINATE', 3, 5]);
    // A decimal comma is not a number either (the hint says to write a dot).
    expect(errorOf(() => read('site,time,state,east,north\na,1,x,"10,5",20\n')).code).toBe('BAD_COORDINATE');
    expect(errorOf(() => read('site,time,state,east,north\na,1,x,Infinity,20\n')).code).toBe('BAD_COORDINATE');
  });

  it('refuses a missing coordinate', () => {
    const err = errorOf(() => read('site,time,state,east,north\na,1,x,10,\n'));
    expect([err.code, err.place.line, err.place.column]).toEqual(['EMPTY_VALUE', 2, 5]);
  });

  it('refuses a site given two positions, naming both lines', () => {
    const err = errorOf(() => read('site,time,state,east,north\na,1,x,10,20\nb,1,y,0,0\na,2,x,10,21\n'));
    expect([err.code, err.place.line, err.place.column]).toEqual(['SITE_MOVED', 4, 4]);
    expect(err.message).toContain('line 2');
  });

  it('refuses a missing column, and one coordinate column without the other', () => {
    expect(errorOf(() => read('site,time,state,east\na,1,x,10\n')).code).toBe('MISSING_COLUMN');
    const settings = { ...DEFAULT_FIT_SETTINGS, columns: { ...DEFAULT_COLUMNS, x: 'east' } };
    const err = errorOf(() => surveyReadOptions(settings));
    expect([err.code, err.place.path]).toEqual(['BAD_OPTION', '--x-column']);
  });

  it('refuses a block size that is not positive, or larger than the extent, naming the flag', () => {
    const table = read('site,time,state,east,north\na,1,x,0,0\na,2,y,0,0\nb,1,y,100,50\nb,2,x,100,50\n');
    for (const blockSize of [0, -5, Number.NaN, 101]) {
      const err = errorOf(() => fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, columns, blockSize }));
      expect([err.code, err.place.path]).toEqual(['BAD_OPTION', '--block-size']);
    }
    expect(fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, columns, blockSize: 100 }).spatial!.blocks).toBe(2);
  });
});
