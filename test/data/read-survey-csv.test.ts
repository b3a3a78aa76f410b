import { describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { SereError } from '../../src/errors.js';
import { maximumLikelihood } from '../../src/chain/estimates.js';
import { fitPrior } from '../../src/fit/fit.js';

const fixture = (name: string): string => `test/fixtures/${name}`;
const read = (name: string, states?: string[]) => readSurveyCsv(fixture(name), { columns: DEFAULT_COLUMNS, states });

function errorOf(fn: () => unknown): SereError {
  try { fn(); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

describe('counting a hand-countable survey table', () => {
  it('counts consecutive one-step pairs per site and divides by row sums (counted by hand)', () => {
    // Site A: a a b a b b c (times 1–7); site B: c c b (times 3–5).
    // a→a 1, a→b 2 · b→a 1, b→b 1, b→c 1 · c→b 1, c→c 1.
    const fit = fitSurvey(read('hand.csv'), DEFAULT_FIT_SETTINGS);
    expect(fit.states).toEqual(['a', 'b', 'c']);
    expect(Array.from(fit.counts)).toEqual([1, 2, 0, 1, 1, 1, 0, 1, 1]);
    expect(fit.transitions).toBe(8);
    const { p } = maximumLikelihood(fit.counts, fitPrior(fit), 3);
    expect(Array.from(p)).toEqual([1 / 3, 2 / 3, 0, 1 / 3, 1 / 3, 1 / 3, 0, 1 / 2, 1 / 2]);
    expect(fit.latest).toEqual({ time: 7, counts: [0, 0, 1], shares: [0, 0, 1], sites: 1 });
    expect(fit.sites.map((s) => s.site)).toEqual(['A', 'B']);
  });

  it('keeps declared state order, and counts rows in any order the same', () => {
    const fit = fitSurvey(read('hand.csv', ['c', 'b', 'a']), DEFAULT_FIT_SETTINGS);
    expect(Array.from(fit.counts)).toEqual([1, 1, 0, 1, 1, 1, 0, 2, 1]);
  });

  it('counts pairs further apart than one step as skipped, and fits 5-year steps with step 5', () => {
    const table = read('five-year.csv');
    const err = errorOf(() => fitSurvey(table, DEFAULT_FIT_SETTINGS));
    expect(err.code).toBe('NO_TRANSITIONS');
    expect(err.hint).toContain('--step 5');
    const fit = fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, step: 5 });
    expect(Array.from(fit.counts)).toEqual([0, 1, 0, 1]);
    const gaps = fitSurvey(read('gap.csv'), DEFAULT_FIT_SETTINGS);
    expect(Array.from(gaps.counts)).toEqual([0, 1, 0, 0]);
    expect(gaps.skipped).toEqual([{ gap: 2, pairs: 1 }, { gap: 3, pairs: 1 }]);
  });
});

describe('bad survey tables', () => {
  const cases: [string, string, number | undefined, string[]?][] = [
    ['empty-state.csv', 'EMPTY_VALUE', 4],
    ['bad-time.csv', 'BAD_TIME', 3],
    ['duplicate.csv', 'DUPLICATE_SURVEY', 4],
    ['missing-column.csv', 'MISSING_COLUMN', 1],
    ['empty.csv', 'EMPTY_FILE', undefined],
    ['ragged.csv', 'NOT_CSV', 3],
    ['case-clash.csv', 'STATE_CASE_CLASH', 3],
    ['not-text.csv', 'FILE_NOT_TEXT', undefined],
    ['no-such-file.csv', 'FILE_NOT_FOUND', undefined],
    ['hand.csv', 'UNKNOWN_STATE', 4, ['a', 'c']],
  ];
  for (const [file, code, line, states] of cases) {
    it(`${file}${states ? ` with --states ${states.join(',')}` : ''} → ${code}${line ? ` at line ${line}` : ''}`, () => {
      const err = errorOf(() => read(file, states));
      expect(err.code).toBe(code);
      expect(err.place.file).toBe(fixture(file));
      expect(err.place.line).toBe(line);
    });
  }

  it('names the column of an empty state and both lines of a conflicting duplicate', () => {
    expect(errorOf(() => read('empty-state.csv')).place.column).toBe(3);
    expect(errorOf(() => read('duplicate.csv')).message).toContain('line 3');
  });

  it('reports an observed transition declared impossible, with the line where it ends', () => {
    const err = errorOf(() => fitSurvey(read('hand.csv'), { ...DEFAULT_FIT_SETTINGS, impossible: [['a', 'b']] }));
    expect(err.code).toBe('IMPOSSIBLE_OBSERVED');
    expect(err.place.line).toBe(4);
  });
});

describe('a semicolon-separated file', () => {
  it('is reported as a missing column with a hint about the separator', () => {
    const err = errorOf(() => read('semicolon.csv'));
    expect(err.code).toBe('MISSING_COLUMN');
    expect(err.hint).toContain('semicolons');
  });
});

describe('the quote-free fast path', () => {
  it('splits exactly as csv-parse does (property: spaces, empty lines, CRLF, BOM)', async () => {
    const fc = (await import('fast-check')).default;
    const { csvParseRows, splitPlainCsv } = await import('../../src/data/read-survey-csv.js');
    const field = fc.stringMatching(/^[ a-z0-9._-]{0,6}$/);
    const table = fc.integer({ min: 1, max: 4 }).chain((width) =>
      fc.array(fc.oneof(fc.array(field, { minLength: width, maxLength: width }).map((f) => f.join(',')), fc.constantFrom('', '  ')),
        { minLength: 1, maxLength: 12 }));
    fc.assert(fc.property(table, fc.boolean(), fc.boolean(), (lines, crlf, bom) => {
      if (lines.every((l) => l.trim() === '')) return;
      const text = (bom ? '\uFEFF' : '') + lines.join(crlf ? '\r\n' : '\n') + '\n';
      expect(splitPlainCsv('t.csv', text)).toEqual(csvParseRows('t.csv', text));
    }), { numRuns: 500 });
  });
});

describe('several survey tables read as one', () => {
  it('takes the union of states, sorted, and keeps every record', async () => {
    const { readSurveyTables } = await import('../../src/data/read-survey-tables.js');
    const table = readSurveyTables([fixture('hand.csv'), fixture('next-season.csv')], { columns: DEFAULT_COLUMNS });
    expect(table.states).toEqual(['a', 'b', 'c']);
    expect(table.records).toHaveLength(12);
    expect(table.records.at(-1)).toMatchObject({ site: 'B', time: 2025, state: 2 });
    expect(table.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('names both files when a site disagrees with itself across them', async () => {
    const { readSurveyTables } = await import('../../src/data/read-survey-tables.js');
    const err = errorOf(() => readSurveyTables([fixture('hand.csv'), fixture('conflict-season.csv')], { columns: DEFAULT_COLUMNS }));
    expect(err.code).toBe('DUPLICATE_SURVEY');
    expect(err.place).toMatchObject({ file: fixture('conflict-season.csv'), line: 2 });
    expect(err.message).toContain(`in ${fixture('hand.csv')} line 8`);
  });
});
