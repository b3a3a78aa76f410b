import { SereError } from '../../src/errors.js';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS, type SurveyColumns } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { errorOf, tempFiles } from '../helpers.js';

const { write } = tempFiles('sere-wide-');
const read = (file: string, extra: { layout?: 'long' | 'wide'; columns?: Partial<SurveyColumns>; blockSize?: number } = {}) =>
  readSurveyCsv(file, { columns: { ...DEFAULT_COLUMNS, ...extra.columns }, layout: extra.layout, blockSize: extra.blockSize });

/**
 * An invented survey: 60 sites in two zones over 7 years, states drawn from a seeded stream, about
 * a fifth of the cells left unsurveyed — written both ways, so the two layouts can be compared.
 */
function invented(): { long: string; wide: string } {
  const random = randomStreams(20261202).stream('wide-table');
  const states = ['bare', 'grass', 'scrub', 'wood'];
  const years = [2015, 2016, 2017, 2018, 2019, 2021, 2022];
  const long = ['site,zone,time,state'];
  const wide = [`site,zone,${years.join(',')}`];
  for (let s = 0; s < 60; s++) {
    const site = `P${String(s).padStart(3, '0')}`;
    const zone = s % 2 === 0 ? 'north' : 'south';
    let state = random.integer(4);
    const cells: string[] = [];
    for (const year of years) {
      if (random.uniform() < 0.8) state = random.uniform() < 0.7 ? state : random.integer(4);
      const surveyed = random.uniform() > 0.2;
      cells.push(surveyed ? states[state]! : '');
      if (surveyed) long.push(`${site},${zone},${year},${states[state]}`);
    }
    wide.push(`${site},${zone},${cells.join(',')}`);
  }
  return { long: long.join('\n') + '\n', wide: wide.join('\r\n') + '\r\n' };
}

describe('wide survey tables (one row per site, one column per survey time)', () => {
  const { long, wide } = invented();
  const longFile = write('long.csv', long);
  const wideFile = write('wide.csv', wide);

  it('give the same fit as the long table they are written from: counts, latest mix, site counts, groups', () => {
    const settings = { ...DEFAULT_FIT_SETTINGS, columns: { ...DEFAULT_COLUMNS, group: 'zone' } };
    const a = fitSurvey(readSurveyCsv(longFile, { columns: settings.columns }), settings);
    for (const layout of [undefined, 'wide'] as const) {
      const b = fitSurvey(readSurveyCsv(wideFile, { columns: settings.columns, layout }), settings);
      expect(b.states).toEqual(a.states);
      expect(Array.from(b.counts)).toEqual(Array.from(a.counts));
      expect(b.latest).toEqual(a.latest);
      expect(b.sites.ids).toEqual(a.sites.ids);
      expect(b.sites.groups).toEqual(a.sites.groups);
      expect(JSON.stringify(b.sites)).toEqual(JSON.stringify(a.sites));
      expect(b.surveys).toBe(a.surveys);
      expect(b.skipped).toEqual(a.skipped);
      expect(b.transitions).toBeGreaterThan(100);
    }
  });

  it('reads the same in blocks of any size, and with quotes (the csv-parse path)', () => {
    const whole = read(wideFile, { columns: { group: 'zone' } });
    const quoted = read(write('quoted.csv', wide.replace(/(P\d{3})/g, '"$1"')), { columns: { group: 'zone' } });
    expect(quoted.sites).toEqual(whole.sites);
    expect(Array.from(quoted.rows.state)).toEqual(Array.from(whole.rows.state));
    for (const blockSize of [1, 5, 17]) {
      const t = read(wideFile, { columns: { group: 'zone' }, blockSize });
      expect(Array.from(t.rows.state)).toEqual(Array.from(whole.rows.state));
      expect(Array.from(t.rows.time)).toEqual(Array.from(whole.rows.time));
    }
  });

  it('counts a hand-made wide table: empty cells are not surveyed, a site with no survey is no site', () => {
    // A: a a b (2001–2003) → a→a, a→b; B: b _ b b → b→b (2003→2004) and one pair 2 years apart; C never surveyed.
    const file = write('hand-wide.csv', 'site,2001,2002,2003,2004\nA,a,a,b,\nB,b,,b,b\nC,,,,\n');
    const fit = fitSurvey(read(file), DEFAULT_FIT_SETTINGS);
    expect(fit.states).toEqual(['a', 'b']);
    expect(Array.from(fit.counts)).toEqual([1, 1, 0, 1]);
    expect(fit.pairsByGap).toEqual([{ gap: 1, pairs: 3 }, { gap: 2, pairs: 1 }]);
    expect(fit.sites.ids).toEqual(['A', 'B']);
    // A, last surveyed in 2003 as b, is carried forward one step into the start.
    expect(fit.latest).toEqual({ time: 2004, counts: [0, 1], shares: [0, 1], sites: 1, carried: [{ state: 1, steps: 1, sites: 1 }], notCarried: 0 });
  });

  it('refuses a site given two rows, naming both lines', () => {
    const err = errorOf(() => read(write('dup-site.csv', 'site,2001,2002\nA,a,b\nB,b,b\nA,a,a\n')));
    expect(err).toMatchObject({ code: 'DUPLICATE_SITE', place: { line: 4, column: 1 } });
    expect(err.message).toContain('line 2');
  });

  it('names the line, column and time of a bad cell', () => {
    const err = errorOf(() => readSurveyCsv(write('unknown.csv', 'site,2001,2002,2003\nA,a,b,a\nB,b,x,b\n'), { columns: DEFAULT_COLUMNS, states: ['a', 'b'] }));
    expect(err).toMatchObject({ code: 'UNKNOWN_STATE', place: { line: 3, column: 3 } });
    expect(err.message).toContain('2002');
  });

  const bad: [string, string, string, { layout?: 'wide'; columns?: Partial<SurveyColumns> }, number | undefined, number | undefined][] = [
    ['a column that is not a time, with --wide', 'site,2001,notes\nA,a,x\n', 'BAD_TIME', { layout: 'wide' }, 1, 3],
    ['two columns for one time', 'site,2001,2001\nA,a,b\n', 'DUPLICATE_COLUMN', { layout: 'wide' }, 1, 3],
    ['no time column', 'site,zone\nA,n\n', 'MISSING_COLUMN', { layout: 'wide', columns: { group: 'zone' } }, 1, undefined],
    ['an empty site', 'site,2001,2002\nA,a,b\n,b,a\n', 'EMPTY_VALUE', {}, 3, 1],
    ['a value under an empty header', 'site,2001,2002,\nA,a,b,\nB,b,a,x\n', 'BAD_CELL', {}, 3, 4],
    ['a table of empty cells', 'site,2001,2002\nA,,\nB,,\n', 'EMPTY_FILE', {}, 1, undefined],
    ['a time that is not whole', 'site,2001,2001.5\nA,a,b\n', 'MISSING_COLUMN', {}, 1, undefined],
  ];
  for (const [what, text, code, extra, line, column] of bad) {
    it(`refuses ${what} (${code})`, () => {
      const err = errorOf(() => read(write(`bad-${code}.csv`, text), extra));
      expect(err.code).toBe(code);
      expect(err.place.line).toBe(line);
      expect(err.place.column).toBe(column);
    });
  }

  it('hints at --wide when a wide header has one column that is not a time', () => {
    const err = errorOf(() => read(write('stray.csv', 'site,2001,2002,notes\nA,a,b,x\n')));
    expect(err.code).toBe('MISSING_COLUMN');
    expect(err.hint).toContain('--wide');
  });

  it('keeps reading a long table as long, even when its extra columns are headed by numbers', () => {
    const t = read(write('long-extra.csv', 'site,time,state,2001\nA,1,a,\nA,2,b,\n'));
    expect(t.rows.count).toBe(2);
  });

  it('any table: long and wide give the same outcome — the same fit, or the same refusal (property)', () => {
    const years = [2000, 2001, 2002, 2004, 2005];
    let n = 0;
    fc.assert(fc.property(
      fc.array(fc.tuple(fc.constantFrom('n', 's'), fc.array(fc.constantFrom('', 'a', 'b', 'c'), { minLength: years.length, maxLength: years.length })), { minLength: 1, maxLength: 8 }),
      (plots) => {
        n += 1;
        const long = ['site,zone,time,state'];
        const wideLines = [`site,zone,${years.join(',')}`];
        plots.forEach(([zone, cells], p) => {
          cells.forEach((state, y) => { if (state !== '') long.push(`S${p},${zone},${years[y]},${state}`); });
          wideLines.push(`S${p},${zone},${cells.join(',')}`);
        });
        const settings = { ...DEFAULT_FIT_SETTINGS, columns: { ...DEFAULT_COLUMNS, group: 'zone' } };
        const outcome = (file: string): unknown => {
          try {
            const fit = fitSurvey(readSurveyCsv(file, { columns: settings.columns }), settings);
            return { states: fit.states, counts: Array.from(fit.counts), latest: fit.latest, sites: JSON.stringify(fit.sites), skipped: fit.skipped };
          } catch (err) {
            if (err instanceof SereError) return err.code;
            throw err;
          }
        };
        expect(outcome(write(`p${n}-wide.csv`, wideLines.join('\n') + '\n'))).toEqual(outcome(write(`p${n}-long.csv`, long.join('\n') + '\n')));
      }), { numRuns: 150, seed: 20261202 });
  });
});
