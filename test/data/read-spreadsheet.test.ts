import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import ExcelJS from 'exceljs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { surveysCsv, writeWorkbooks } from '../../scripts/make-workbooks.js';
import { readLabelMap } from '../../src/data/label-map.js';
import { readSurveyCsv, type ReadSurveyOptions } from '../../src/data/read-survey-csv.js';
import { formatPlace } from '../../src/errors.js';
import { fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { sereInProcess } from '../cli/in-process.js';
import { errorOf } from '../helpers.js';
import { unreadableReason } from '../../src/data/read-spreadsheet.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-xlsx-'));
let books: { surveys: string; faults: string };
const csv = join(dir, 'surveys.csv');
const mapFile = join(dir, 'labels.yaml');
beforeAll(async () => {
  books = await writeWorkbooks(dir);
  writeFileSync(csv, surveysCsv);
  writeFileSync(mapFile, '41: woodland\n');
});

const columns = { site: 'plot', time: 'year', state: 'cover' };
const options = (extra: Partial<ReadSurveyOptions> = {}): ReadSurveyOptions =>
  ({ columns, states: ['grass', 'heath', 'scrub', 'woodland'], labels: readLabelMap(mapFile), ...extra });
const fitOf = (file: string, extra: Partial<ReadSurveyOptions> = {}) => fitSurvey(readSurveyCsv(file, options(extra)), DEFAULT_FIT_SETTINGS);

describe('survey tables in .xlsx workbooks (exceljs)', () => {
  it('reads the first sheet by default, as the CSV of the same surveys: formula results, class codes, rich text, padding', () => {
    const a = fitOf(books.surveys);
    const b = fitOf(csv);
    expect(a.states).toEqual(b.states);
    expect(Array.from(a.counts)).toEqual(Array.from(b.counts));
    expect(a.latest).toEqual(b.latest);
    expect(JSON.stringify(a.sites)).toEqual(JSON.stringify(b.sites));
    expect(a.surveys).toBe(14);
    // Counted by hand from surveysCsv: grass→grass 2, grass→heath 2, heath→heath 1, heath→scrub 1, scrub→scrub 2, scrub→woodland 1.
    expect(Array.from(a.counts)).toEqual([2, 2, 0, 0, 0, 1, 1, 0, 0, 0, 2, 1, 0, 0, 0, 0]);
  });

  it('reads a wide sheet named with --sheet, with a group column, as the long one', () => {
    const grouped = { ...columns, group: 'zone' };
    const a = fitSurvey(readSurveyCsv(books.surveys, options({ sheet: 'By year', columns: grouped })), DEFAULT_FIT_SETTINGS);
    const b = fitSurvey(readSurveyCsv(csv, options({ columns: grouped })), DEFAULT_FIT_SETTINGS);
    expect(Array.from(a.counts)).toEqual(Array.from(b.counts));
    expect(a.latest).toEqual(b.latest);
    expect(JSON.stringify(a.sites)).toEqual(JSON.stringify(b.sites));
  });

  it('names the sheets there when the sheet asked for is not', () => {
    const err = errorOf(() => readSurveyCsv(books.surveys, options({ sheet: 'Plot' })));
    expect(err).toMatchObject({ code: 'UNKNOWN_SHEET', place: { file: books.surveys, path: '--sheet' } });
    expect(err.message).toContain("'Plots', 'By year', 'Notes'");
  });

  const faults: [string, string, number, number][] = [
    ['date', 'BAD_TIME', 4, 2],
    ['no result', 'BAD_CELL', 4, 2],
    ['error', 'BAD_CELL', 4, 2],
    ['fraction', 'BAD_TIME', 4, 2],
    ['beyond', 'BAD_CELL', 2, 4],
  ];
  for (const [sheet, code, row, column] of faults) {
    it(`sheet '${sheet}': ${code} at its cell`, () => {
      const err = errorOf(() => readSurveyCsv(books.faults, { columns, sheet }));
      expect(err.code).toBe(code);
      expect(err.place).toEqual({ file: books.faults, sheet, line: row, column });
    });
  }

  it('lists unmapped labels by their sheet row', () => {
    const err = errorOf(() => readSurveyCsv(books.surveys, { columns, labels: readLabelMap(mapFile) }));
    expect(err).toMatchObject({ code: 'UNMAPPED_LABEL', place: { file: books.surveys, sheet: 'Plots', line: 2, column: 4 } });
    expect(err.message).toContain("'heath' (row 2)");
  });

  it('prints the place of a cell as sheet and A1 reference', () => {
    expect(formatPlace({ file: 'f.xlsx', sheet: 'Plots', line: 4, column: 2 })).toBe("f.xlsx, sheet 'Plots', cell B4");
    expect(formatPlace({ file: 'f.xlsx', sheet: 'S', line: 9, column: 28 })).toBe("f.xlsx, sheet 'S', cell AB9");
    expect(formatPlace({ file: 'f.xlsx', sheet: 'S', line: 9, column: 702 })).toBe("f.xlsx, sheet 'S', cell ZZ9");
    expect(formatPlace({ file: 'f.xlsx', sheet: 'S', line: 9, column: 703 })).toBe("f.xlsx, sheet 'S', cell AAA9");
  });

  it('refuses a file that is not a workbook, other spreadsheet formats, and --sheet on a CSV', () => {
    const fake = join(dir, 'fake.xlsx');
    writeFileSync(fake, surveysCsv);
    const notZip = errorOf(() => readSurveyCsv(fake, { columns }));
    expect(notZip.code).toBe('BAD_SPREADSHEET');
    // The zip reader's own words (and its web address) are not passed on: the file is not a zip archive.
    expect(notZip.message).not.toMatch(/https?:|central directory/);
    expect(notZip.message).toMatch(/zip archive/);
    expect(unreadableReason('Corrupted zip: can\'t find end of central directory')).toBe(unreadableReason('Can\'t find end of central directory : is this a zip file ?'));
    expect(unreadableReason('Bad sheet XML at 3\nmore')).toBe('Bad sheet XML at 3');
    expect(unreadableReason('Oops, see https://example.org/x for more')).not.toMatch(/https?:/);
    const ods = join(dir, 'surveys.ods');
    writeFileSync(ods, 'x');
    expect(errorOf(() => readSurveyCsv(ods, { columns })).code).toBe('BAD_SPREADSHEET');
    expect(errorOf(() => readSurveyCsv(csv, { columns, sheet: 'Plots' })).code).toBe('BAD_OPTION');
  });

  it('refuses a workbook with no worksheet as the file, not as --sheet', async () => {
    const empty = join(dir, 'empty.xlsx');
    writeFileSync(empty, Buffer.from(await new ExcelJS.Workbook().xlsx.writeBuffer()));
    const err = errorOf(() => readSurveyCsv(empty, { columns }));
    expect(err).toMatchObject({ code: 'BAD_SPREADSHEET', place: { file: empty } });
    expect(err.place?.path).toBeUndefined();
  });

  it('sere fit reads a workbook: the same counts as from the CSV, and one line for an unknown sheet', async () => {
    const flags = ['--site-column', 'plot', '--time-column', 'year', '--state-column', 'cover', '--labels', mapFile, '--states', 'grass,heath,scrub,woodland', '--json'];
    const fromBook = await sereInProcess(['fit', books.surveys, ...flags]);
    const fromCsv = await sereInProcess(['fit', csv, ...flags]);
    expect(fromBook.code, fromBook.stderr).toBe(0);
    expect(JSON.parse(fromBook.stdout).counts).toEqual(JSON.parse(fromCsv.stdout).counts);
    const wrong = await sereInProcess(['fit', books.surveys, ...flags, '--sheet', 'Plot']);
    expect(wrong.code).toBe(1);
    expect(wrong.stderr.trimEnd().split('\n')).toHaveLength(1);
  });
});
