import { readFileSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { roundToSeasons } from '../../src/data/seasons.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { heathSurveys } from '../../scripts/heath-fixture.js';
import { errorOf } from '../helpers.js';

const day = (iso: string): number => Date.UTC(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10))) / 86_400_000;


function table(text: string, dates: boolean) {
  const file = join(mkdtempSync(join(tmpdir(), 'sere-dates-')), 't.csv');
  writeFileSync(file, text);
  return { file, read: () => readSurveyCsv(file, { columns: DEFAULT_COLUMNS, dates }) };
}

describe('survey dates rounded to yearly seasons', () => {
  it('late-summer visits: each to its own year, the centre near their middle, the largest shift reported with its line', () => {
    const dates = ['2020-08-01', '2020-08-31', '2021-08-10', '2021-08-20', '2022-07-20'];
    const time = Float64Array.from(dates, day);
    const r = roundToSeasons(time, Float64Array.from([2, 3, 4, 5, 6]), 5);
    expect(Array.from(time)).toEqual([2020, 2020, 2021, 2021, 2022]);
    expect(r.centre).toMatch(/^08-(0\d|1\d)$/);
    expect(r.largestShiftLine).toBe(6);
    expect(r.otherYear).toBe(0);
  });

  it('a season across the new year: a January visit belongs with the December ones before it', () => {
    const dates = ['2019-12-10', '2020-12-15', '2022-01-05', '2022-12-20'];
    const time = Float64Array.from(dates, day);
    const r = roundToSeasons(time, Float64Array.from([2, 3, 4, 5]), 4);
    // The centre is late December; 2022-01-05 is the 2021 season (a week after its centre), reported as another year.
    expect(Array.from(time)).toEqual([2019, 2020, 2021, 2022]);
    expect(r.otherYear).toBe(1);
  });

  it('--step 1y reads the dated heath table into exactly the fit of the same surveys by year', () => {
    const byYear = fitSurvey(readSurveyCsv('test/fixtures/heath/surveys.csv', { columns: DEFAULT_COLUMNS }), DEFAULT_FIT_SETTINGS);
    const dated = fitSurvey(readSurveyCsv('test/fixtures/heath/surveys-dated.csv', { columns: DEFAULT_COLUMNS, dates: true }), { ...DEFAULT_FIT_SETTINGS, dates: true });
    expect(readFileSync('test/fixtures/heath/surveys-dated.csv', 'utf8')).toBe(heathSurveys(undefined, true));
    expect(Array.from(dated.counts)).toEqual(Array.from(byYear.counts));
    expect(dated.gapCounts).toEqual(byYear.gapCounts);
    expect(dated.seasons!.dates).toBe(1320);
    expect(dated.seasons!.largestShiftDays).toBeLessThanOrEqual(40);
  });

  it('a date that does not exist, or one in another form, is BAD_TIME at its line and column', () => {
    for (const bad of ['2023-02-29', '15/08/2023', '2023-8-15']) {
      const err = errorOf(() => table(`site,time,state\nA,2022-08-01,x\nA,${bad},y\n`, true).read());
      expect(err.code).toBe('BAD_TIME');
      expect(err.place).toMatchObject({ line: 3, column: 2 });
    }
  });

  it('two visits of one site that fall in one season are a repeated survey: a contradiction names both lines', () => {
    const err = errorOf(() => table('site,time,state\nA,2022-08-01,x\nA,2022-09-01,y\nA,2023-08-01,x\n', true).read());
    expect(err.code).toBe('DUPLICATE_SURVEY');
    expect(err.place.line).toBe(3);
  });

  it('dates read as whole-number times: the hint says --step 1y', () => {
    const err = errorOf(() => table('site,time,state\nA,2022-08-01,x\nA,2023-08-01,y\n', false).read());
    expect(err.code).toBe('BAD_TIME');
    expect(err.hint).toContain('--step 1y');
  });
});
