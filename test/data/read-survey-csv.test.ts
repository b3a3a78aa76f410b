import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CsvParseScanner } from '../../src/data/scan-csv-parse.js';
import { PlainCsvScanner } from '../../src/data/scan-plain-csv.js';
import type { RowSink } from '../../src/data/row-sink.js';
import { recordAt, tableFromRecords } from '../../src/data/survey-rows.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { DEFAULT_COLUMNS } from '../../src/data/survey.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { SereError } from '../../src/errors.js';
import { maximumLikelihood } from '../../src/chain/estimates.js';
import { fitPrior } from '../../src/fit/fit.js';
import { errorOf } from '../helpers.js';

const fixture = (name: string): string => `test/fixtures/${name}`;
const read = (name: string, states?: string[]) => readSurveyCsv(fixture(name), { columns: DEFAULT_COLUMNS, states });


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
    expect(fit.latest).toEqual({ time: 7, counts: [0, 0, 1], shares: [0, 0, 1], sites: 1, carried: [{ state: 1, steps: 2, sites: 1 }], notCarried: 0 });
    expect(fit.sites.ids).toEqual(['A', 'B']);
  });

  it('keeps declared state order, and counts rows in any order the same', () => {
    const fit = fitSurvey(read('hand.csv', ['c', 'b', 'a']), DEFAULT_FIT_SETTINGS);
    expect(Array.from(fit.counts)).toEqual([1, 1, 0, 1, 1, 1, 0, 2, 1]);
  });

  it('counts pairs further apart than one step by gap (none skipped), and fits 5-year steps with step 5', () => {
    const table = read('five-year.csv');
    const err = errorOf(() => fitSurvey(table, DEFAULT_FIT_SETTINGS));
    expect(err.code).toBe('NO_TRANSITIONS');
    expect(err.hint).toContain('--step 5');
    const fit = fitSurvey(table, { ...DEFAULT_FIT_SETTINGS, step: 5 });
    expect(Array.from(fit.counts)).toEqual([0, 1, 0, 1]);
    const gaps = fitSurvey(read('gap.csv'), DEFAULT_FIT_SETTINGS);
    expect(Array.from(gaps.counts)).toEqual([0, 1, 0, 0]);
    expect(gaps.skipped).toEqual([]);
    expect(gaps.gapCounts).toEqual([[1, 1, 2, 1], [1, 0, 3, 1]]);
    expect(gaps.pairsByGap).toEqual([{ gap: 1, pairs: 1 }, { gap: 2, pairs: 1 }, { gap: 3, pairs: 1 }]);
    expect(gaps.singleSurveySites).toBe(0);
  });

  it('a table where no site is surveyed twice says so (not "no surveys one step apart")', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-once-'));
    writeFileSync(join(dir, 'once.csv'), 'site,time,state\na,2020,x\nb,2020,y\nc,2021,x\n');
    const err = errorOf(() => fitSurvey(readSurveyCsv(join(dir, 'once.csv'), { columns: DEFAULT_COLUMNS }), DEFAULT_FIT_SETTINGS));
    expect(err.code).toBe('NO_TRANSITIONS');
    expect(err.message).toContain('no site is surveyed twice');
  });

  it('refuses a gap that is not a whole number of steps, at the later survey, suggesting the step that divides every gap', () => {
    // gap.csv: site A at 1, 2, 4, 7. With --step 2 the first pair (1 → 2, ending on line 3) is half a step.
    const err = errorOf(() => fitSurvey(read('gap.csv'), { ...DEFAULT_FIT_SETTINGS, step: 2 }));
    expect(err.code).toBe('GAP_NOT_WHOLE_STEPS');
    expect(err.place).toEqual({ file: fixture('gap.csv'), line: 3 });
    expect(err.hint).toContain('--step 1');
  });

  it('refuses pairs that no path of allowed transitions explains in their gap, at the later survey', () => {
    // gap.csv with b>a and a>a impossible: b reaches only b, so the 3-step pair b → a (line 5) cannot happen.
    const err = errorOf(() => fitSurvey(read('gap.csv'), { ...DEFAULT_FIT_SETTINGS, impossible: [['b', 'a'], ['a', 'a']] }));
    expect(err.code).toBe('IMPOSSIBLE_OBSERVED');
    expect(err.place.line).toBe(5);
  });

  it('counts sites surveyed once only', () => {
    const table = tableFromRecords('t.csv', ['a', 'b'], [
      { site: 'A', time: 1, state: 0, line: 2 }, { site: 'A', time: 2, state: 1, line: 3 }, { site: 'B', time: 2, state: 0, line: 4 },
    ]);
    expect(fitSurvey(table, DEFAULT_FIT_SETTINGS).singleSurveySites).toBe(1);
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

/** The records a scanner sends, fields decoded (and trimmed, as the reader does for the plain scanner). */
function scanned(text: string, scanner: 'plain' | 'csv-parse'): { fields: string[]; line: number }[] | string {
  const out: { fields: string[]; line: number }[] = [];
  let failed = '';
  const sink: RowSink = {
    row: (bytes, starts, ends, n, line) => {
      const fields = Array.from({ length: n }, (_, i) => bytes.toString('utf8', starts[i]!, ends[i]!));
      out.push({ fields: scanner === 'plain' ? fields.map((f) => f.trim()) : fields, line });
    },
    notCsv: (err) => { failed = `${err.code} line ${err.place.line}`; },
    expect: () => {},
  };
  const bytes = Buffer.from(text);
  if (scanner === 'plain') new PlainCsvScanner('t.csv', sink, bytes.length).block(bytes, 0, bytes.length, true);
  else {
    const csv = new CsvParseScanner('t.csv', sink);
    csv.block(bytes, 0, bytes.length);
    csv.end();
  }
  return failed || out;
}

describe('the quote-free fast path', () => {
  it('splits exactly as csv-parse does (property: spaces, empty lines, CRLF, BOM, ragged rows)', async () => {
    const fc = (await import('fast-check')).default;
    const field = fc.stringMatching(/^[ a-z0-9._\u00a0\u00e9-]{0,6}$/);
    const table = fc.integer({ min: 1, max: 4 }).chain((width) =>
      fc.array(fc.oneof(
        fc.array(field, { minLength: width, maxLength: width }).map((f) => f.join(',')),
        fc.array(field, { minLength: 1, maxLength: 5 }).map((f) => f.join(',')),
        fc.constantFrom('', '  ', '\u00a0', '\t')),
      { minLength: 1, maxLength: 12 }));
    fc.assert(fc.property(table, fc.boolean(), fc.boolean(), (lines, crlf, bom) => {
      if (lines.every((l) => l.trim() === '')) return;
      const text = (bom ? '\uFEFF' : '') + lines.join(crlf ? '\r\n' : '\n') + '\n';
      const csv = scanned(text, 'csv-parse');
      // csv-parse names the line of a ragged record as plain splitting does; its message differs only in wording.
      expect(scanned(text, 'plain')).toEqual(csv);
    }), { numRuns: 500 });
  });

  it('a quote anywhere sends the whole table through csv-parse, however far into the file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-quoted-'));
    const rows = Array.from({ length: 400 }, (_, n) => `p${n % 40},${2000 + Math.floor(n / 40)},${n % 3 ? 'grass' : 'bare'}`);
    const file = join(dir, 'late-quote.csv');
    writeFileSync(file, ['site,time,state', ...rows, '"p,99",2000,"bare"', '"p,99",2001,grass', ''].join('\r\n'));
    for (const blockSize of [64, 1 << 20]) {
      const table = readSurveyCsv(file, { columns: DEFAULT_COLUMNS, blockSize });
      expect(table.sites).toContain('p,99');
      expect(table.rows.count).toBe(402);
      expect(fitSurvey(table, DEFAULT_FIT_SETTINGS).transitions).toBe(361);
    }
  });
});

describe('reading in blocks', () => {
  const fixtures = readdirSync('test/fixtures').filter((f) => f.endsWith('.csv')).map(fixture);
  const outcome = (file: string, blockSize?: number): unknown => {
    try {
      const t = readSurveyCsv(file, { columns: DEFAULT_COLUMNS, blockSize });
      return { ...t, rows: { ...t.rows, site: Array.from(t.rows.site), time: Array.from(t.rows.time), state: Array.from(t.rows.state), line: Array.from(t.rows.line) } };
    } catch (err) {
      if (!(err instanceof SereError)) throw err;
      return { code: err.code, place: err.place, message: err.message };
    }
  };
  it('gives the same table, or the same error, with blocks of a few bytes as with one block', () => {
    for (const file of fixtures) for (const size of [1, 5, 17]) expect(outcome(file, size), `${file} in ${size}-byte blocks`).toEqual(outcome(file));
  });

  it('reports the problem that ranks first, not the one met first (as when each check ran over the whole table)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-rank-'));
    const write = (name: string, content: string | Buffer): string => { const f = join(dir, name); writeFileSync(f, content); return f; };
    // A bad time on line 2, then a ragged row on line 4: the table is not CSV.
    expect(errorOf(() => readSurveyCsv(write('a.csv', 'site,time,state\nA,x,a\nA,2,b\nA,3\n'), { columns: DEFAULT_COLUMNS })))
      .toMatchObject({ code: 'NOT_CSV', place: { line: 4 } });
    // An empty state on line 2, then a site with an invisible character on line 4.
    expect(errorOf(() => readSurveyCsv(write('b.csv', 'site,time,state\nA,1,\nA,2,b\nB\u200b,3,a\n'), { columns: DEFAULT_COLUMNS })))
      .toMatchObject({ code: 'INVISIBLE_CHARACTER', place: { line: 4, column: 1 } });
    // A case clash of states on line 3, then an empty value on line 4.
    expect(errorOf(() => readSurveyCsv(write('c.csv', 'site,time,state\nA,1,bog\nA,2,Bog\nA,,a\n'), { columns: DEFAULT_COLUMNS })))
      .toMatchObject({ code: 'EMPTY_VALUE', place: { line: 4, column: 2 } });
    // Bytes that are not UTF-8 on line 2, then a NUL byte at the very end, in another block.
    const bytes = Buffer.concat([Buffer.from('site,time,state\nA,1,caf'), Buffer.from([0xe9]), Buffer.from('\nA,2,b\n'.repeat(50)), Buffer.from([0])]);
    expect(errorOf(() => readSurveyCsv(write('d.csv', bytes), { columns: DEFAULT_COLUMNS, blockSize: 64 })).code).toBe('FILE_NOT_TEXT');
    expect(errorOf(() => readSurveyCsv(write('e.csv', bytes.subarray(0, -1)), { columns: DEFAULT_COLUMNS, blockSize: 64 })))
      .toMatchObject({ code: 'NOT_UTF8', place: { line: 2, column: 8 } });
  });

  it('keeps the earliest contradiction and counts exact repeats, whatever the order of rows', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-dup-'));
    const file = join(dir, 'dup.csv');
    writeFileSync(file, 'site,time,state\nB,2,a\nA,1,a\nB,2,a\nA,1,b\nB,2,b\nA,2,a\n');
    expect(errorOf(() => readSurveyCsv(file, { columns: DEFAULT_COLUMNS }))).toMatchObject({ code: 'DUPLICATE_SURVEY', place: { line: 5 } });
    expect(errorOf(() => readSurveyCsv(file, { columns: DEFAULT_COLUMNS })).message).toContain('on line 3');
    writeFileSync(file, 'site,time,state\nB,2,a\nA,2,a\nB,2,a\nA,1,b\nB,1,b\nA,2,a\n');
    const table = readSurveyCsv(file, { columns: DEFAULT_COLUMNS });
    expect(table.repeatedRows).toBe(2);
    expect(table.sites).toEqual(['A', 'B']);
    expect([0, 1, 2, 3].map((n) => recordAt(table, n))).toEqual([
      { site: 'A', time: 1, state: 1, line: 5 }, { site: 'A', time: 2, state: 0, line: 3 },
      { site: 'B', time: 1, state: 1, line: 6 }, { site: 'B', time: 2, state: 0, line: 2 },
    ]);
  });

  it('reads times exactly: signs, leading zeros, spaces, 2^53 − 1 and beyond', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-time-'));
    const file = join(dir, 't.csv');
    writeFileSync(file, 'site,time,state\nA, +0007 ,a\nB,-3,b\nC,9007199254740991,a\nD,0000000000000000012,b\nE,\u00a05\u00a0,a\n');
    expect(Array.from(readSurveyCsv(file, { columns: DEFAULT_COLUMNS }).rows.time)).toEqual([7, -3, 9007199254740991, 12, 5]);
    writeFileSync(file, 'site,time,state\nA,1,a\nB,9007199254740992,b\n');
    expect(errorOf(() => readSurveyCsv(file, { columns: DEFAULT_COLUMNS }))).toMatchObject({ code: 'BAD_TIME', place: { line: 3, column: 2 } });
    writeFileSync(file, 'site,time,state\nA,1,a\nB,1.5,b\n');
    expect(errorOf(() => readSurveyCsv(file, { columns: DEFAULT_COLUMNS }))).toMatchObject({ code: 'BAD_TIME', place: { line: 3, column: 2 } });
  });
});

describe('several survey tables read as one', () => {
  it('takes the union of states, sorted, and keeps every record', async () => {
    const { readSurveyTables } = await import('../../src/data/read-survey-tables.js');
    const table = readSurveyTables([fixture('hand.csv'), fixture('next-season.csv')], { columns: DEFAULT_COLUMNS });
    expect(table.states).toEqual(['a', 'b', 'c']);
    expect(table.rows.count).toBe(12);
    expect(recordAt(table, table.rows.count - 1)).toMatchObject({ site: 'B', time: 2025, state: 2 });
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
