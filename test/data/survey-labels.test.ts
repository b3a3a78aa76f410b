import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { readSurveyTables } from '../../src/data/read-survey-tables.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { errorOf } from '../helpers.js';


/** A survey table written to a temporary file (invisible characters stay out of the repository's fixtures). */
function table(text: string, name = 'survey.csv'): string {
  const file = join(mkdtempSync(join(tmpdir(), 'sere-labels-')), name);
  writeFileSync(file, text);
  return file;
}
const read = (file: string, states?: string[]) => readSurveyCsv(file, { columns: DEFAULT_COLUMNS, states });
const rows = (...lines: string[]): string => ['site,time,state', ...lines].join('\n') + '\n';

describe('survey times', () => {
  for (const time of ['9007199254740993', '-9007199254740993', '1'.repeat(400)]) {
    it(`refuses ${time.length > 20 ? `a ${time.length}-digit time` : time}, naming line and column`, () => {
      const file = table(rows('A,2020,a', `A,${time},b`));
      const err = errorOf(() => read(file));
      expect(err.code).toBe('BAD_TIME');
      expect(err.place).toEqual({ file, line: 3, column: 2 });
    });
  }

  it('accepts the largest safe whole number', () => {
    const t = Number.MAX_SAFE_INTEGER;
    const fit = fitSurvey(read(table(rows(`A,${t - 1},a`, `A,${t},b`))), DEFAULT_FIT_SETTINGS);
    expect(fit.latest.time).toBe(t);
    expect(fit.transitions).toBe(1);
  });
});

describe('state labels', () => {
  it('a label with a zero-width space is refused with its line and column, not made a new state', () => {
    const file = table(rows('A,1,grass', 'A,2,gra\u200bss', 'A,3,bare'));
    const err = errorOf(() => read(file));
    expect(err.code).toBe('INVISIBLE_CHARACTER');
    expect(err.place).toEqual({ file, line: 3, column: 3 });
    expect(err.message).toContain('U+200B');
  });

  it('a BOM inside a value and a bidi override are refused too, also when states are declared', () => {
    expect(errorOf(() => read(table(rows('A,1,gr\ufeffass', 'A,2,bare')))).code).toBe('INVISIBLE_CHARACTER');
    const bidi = errorOf(() => read(table(rows('A,1,grass', 'A,2,\u202ebare')), ['grass', 'bare']));
    expect(bidi).toMatchObject({ code: 'INVISIBLE_CHARACTER', place: { line: 3, column: 3 } });
  });

  it('NFC: an accent typed two ways is one state', () => {
    const t = read(table(rows('A,1,f\u00e9n', 'A,2,fe\u0301n', 'A,3,bare')));
    expect(t.states).toEqual(['bare', 'f\u00e9n']);
    expect(Array.from(t.rows.state)).toEqual([1, 1, 0]);
  });

  it('a Cyrillic look-alike is reported like a case clash, naming the first line', () => {
    const file = table(rows('A,1,bog', 'A,2,b\u043eg', 'A,3,heath'));
    const err = errorOf(() => read(file));
    expect(err.code).toBe('STATE_LOOK_ALIKE');
    expect(err.place).toEqual({ file, line: 3, column: 3 });
    expect(err.message).toContain('line 2');
    expect(err.message).toContain('U+043E (Cyrillic)');
  });

  it('look-alikes across several survey files are reported as well', () => {
    const one = table(rows('A,1,bog', 'A,2,heath'));
    const two = table(rows('A,3,hea\u03c4h', 'A,4,h\u0435ath'));
    expect(errorOf(() => readSurveyTables([one, two], { columns: DEFAULT_COLUMNS })).code).toBe('STATE_LOOK_ALIKE');
  });

  it('more than 100 states is refused at the 101st, before any fitting', () => {
    const lines = Array.from({ length: 101 }, (_, n) => `S${n},1,state${n}`);
    const err = errorOf(() => read(table(rows(...lines))));
    expect(err.code).toBe('TOO_MANY_STATES');
    expect(err.place.line).toBe(102);
    expect(err.hint).toContain('--state-column');
    expect(read(table(rows(...lines.slice(0, 100)))).states).toHaveLength(100);
  });

  it('more than 100 declared states is refused', () => {
    const states = Array.from({ length: 101 }, (_, n) => `s${n}`);
    expect(errorOf(() => read(table(rows('A,1,s0', 'A,2,s1')), states)).code).toBe('TOO_MANY_STATES');
  });
});

describe('site ids and the header', () => {
  it('site ids are NFC-normalised: one site however its accent was typed', () => {
    const t = read(table(rows('Cr\u00e9e,1,a', 'Cre\u0301e,2,b')));
    expect(t.sites).toEqual(['Cr\u00e9e']);
    expect(t.rows.count).toBe(2);
    expect(fitSurvey(t, DEFAULT_FIT_SETTINGS).transitions).toBe(1);
  });

  it('a site id with an invisible character is refused with its line and column', () => {
    const file = table(rows('A,1,a', 'A\u200d,2,b'));
    expect(errorOf(() => read(file))).toMatchObject({ code: 'INVISIBLE_CHARACTER', place: { file, line: 3, column: 1 } });
  });

  it('a repeated column name in the header is an error naming it on line 1', () => {
    const file = table('site,time,state,state\nA,1,a,b\nA,2,b,a\n');
    const err = errorOf(() => read(file));
    expect(err).toMatchObject({ code: 'DUPLICATE_COLUMN', place: { file, line: 1, column: 4 } });
    expect(err.message).toContain("'state'");
    // Empty names from trailing commas cannot be asked for, so they may repeat.
    expect(read(table('site,time,state,,\nA,1,a,,\nA,2,b,,\n')).rows.count).toBe(2);
  });
});

describe('labels that are names of Object.prototype members', () => {
  it('fit like any other state and site', () => {
    const names = ['constructor', 'toString', 'valueOf', 'hasOwnProperty', '__proto__'];
    const lines = names.flatMap((s, n) => [`${s},1,${s}`, `${s},2,${names[(n + 1) % names.length]}`]);
    const fit = fitSurvey(read(table(rows(...lines))), DEFAULT_FIT_SETTINGS);
    expect(fit.states).toEqual([...names].sort());
    expect(fit.transitions).toBe(5);
    expect([...fit.sites.ids].sort()).toEqual([...names].sort());
    expect(fit.latest.counts.reduce((a, b) => a + b, 0)).toBe(5);
  });
});
