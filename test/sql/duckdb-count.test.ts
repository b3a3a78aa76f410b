import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, describe, expect, it } from 'vitest';
import { readSurveyTables } from '../../src/data/read-survey-tables.js';
import { DEFAULT_COLUMNS, type SurveyColumns } from '../../src/data/survey.js';
import { tallyCounts } from '../../src/chain/tally-counts.js';
import { countsCsv } from '../../src/data/counts-csv.js';
import { countWithDuckDb } from '../../src/sql/duckdb-count.js';
import { SereError } from '../../src/errors.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-duckdb-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let files = 0;
function file(text: string, ext = 'csv'): string {
  const path = join(dir, `t${files++}.${ext}`);
  writeFileSync(path, text);
  return path;
}

interface Options { step: number; perSite: boolean; columns: SurveyColumns; states?: string[] }
const defaults: Options = { step: 1, perSite: false, columns: DEFAULT_COLUMNS };

/** The counts table as CSV text, or the error code, from the in-process counter. */
function inProcess(inputs: string[], o: Options = defaults): string {
  try {
    return countsCsv(tallyCounts(readSurveyTables(inputs, { columns: o.columns, states: o.states }), { step: o.step, perSite: o.perSite }));
  } catch (err) {
    if (err instanceof SereError) return err.code;
    throw err;
  }
}

/** The same from DuckDB. */
async function duck(inputs: string[], o: Options = defaults): Promise<string> {
  try {
    return countsCsv(await countWithDuckDb(inputs, { columns: o.columns, step: o.step, perSite: o.perSite, states: o.states }));
  } catch (err) {
    if (err instanceof SereError) return err.code;
    throw err;
  }
}

describe('counting with DuckDB gives the in-process counts', () => {
  it('on the demo table, with groups and per-site counts', async () => {
    const o = { ...defaults, perSite: true, columns: { ...DEFAULT_COLUMNS, group: 'zone' } };
    const expected = inProcess(['scenarios/brenhollow/surveys.csv'], o);
    expect(expected.split('\n').length).toBeGreaterThan(100);
    expect(await duck(['scenarios/brenhollow/surveys.csv'], o)).toBe(expected);
  });

  it('on random tables: irregular gaps, exact repeats, contradictions, spaces, groups (property)', async () => {
    const table = fc.record({
      step: fc.integer({ min: 1, max: 3 }),
      grouped: fc.boolean(),
      perSite: fc.boolean(),
      rows: fc.array(fc.record({
        site: fc.integer({ min: 0, max: 9 }),
        time: fc.integer({ min: -3, max: 9 }),
        state: fc.constantFrom('a', 'b', ' c', 'Dé', 'e\u0301x'),
      }), { minLength: 1, maxLength: 60 }),
      repeat: fc.nat({ max: 3 }),
      contradict: fc.boolean(),
    });
    await fc.assert(fc.asyncProperty(table, async ({ step, grouped, perSite, rows, repeat, contradict }) => {
      const unique = [...new Map(rows.map((r) => [`${r.site} ${r.time}`, r])).values()];
      const lines = ['site,time,state,zone', ...unique.map((r) => `p${r.site},${r.time},${r.state},z${(r.site + (r.time > 6 ? 1 : 0)) % 2}`)];
      for (let n = 0; n < repeat && n < unique.length; n++) lines.push(lines[1 + n]!);
      if (contradict) lines.push(`p${unique[0]!.site},${unique[0]!.time},zz,z${unique[0]!.site % 2}`);
      const input = file(lines.join('\n') + '\n');
      const o = { step, perSite, columns: { ...DEFAULT_COLUMNS, ...(grouped ? { group: 'zone' } : {}) } };
      expect(await duck([input], o)).toBe(inProcess([input], o));
    }), { numRuns: 40, seed: 20261202 });
  });

  it('on random tables whose site ids and times need trimming or NFC (the normalising path, property)', async () => {
    // Plain tables skip the per-row normalisation (duckdb-count.ts); these rows need it.
    const table = fc.record({
      grouped: fc.boolean(),
      rows: fc.array(fc.record({
        site: fc.constantFrom('p0', ' p0', 'p1\t', 'pé', 'pe\u0301', 'q'),
        time: fc.integer({ min: 0, max: 6 }),
        pad: fc.constantFrom('', ' ', '\u00a0'),
        state: fc.constantFrom('a', 'b ', 'Dé', 'De\u0301'),
        zone: fc.constantFrom('z1', ' z1', 'zé', 'ze\u0301'),
      }), { minLength: 1, maxLength: 40 }),
    });
    await fc.assert(fc.asyncProperty(table, async ({ grouped, rows }) => {
      const lines = ['site,time,state,zone', ...rows.map((r) => `${r.site},${r.pad}${r.time}${r.pad},${r.state},${r.zone}`)];
      const input = file(lines.join('\n') + '\n');
      const o = { ...defaults, columns: { ...DEFAULT_COLUMNS, ...(grouped ? { group: 'zone' } : {}) } };
      expect(await duck([input], o)).toBe(inProcess([input], o));
    }), { numRuns: 30, seed: 20261202 });
  });

  it('several survey tables read as one, and Parquet as CSV', async () => {
    const a = file('site,time,state\nx,1,a\nx,2,b\ny,1,a\n');
    const b = file('site,time,state\nx,3,b\ny,2,a\ny,4,b\nx,2,b\n');
    const expected = inProcess([a, b]);
    expect(await duck([a, b])).toBe(expected);
    const parquet = join(dir, 'both.parquet');
    const db = await (await DuckDBInstance.create(':memory:')).connect();
    await db.run(`COPY (SELECT site, CAST(time AS BIGINT) AS time, state FROM read_csv(['${a}', '${b}'], all_varchar = true)) TO '${parquet}' (FORMAT parquet)`);
    db.closeSync();
    expect(await duck([parquet])).toBe(expected);
  });

  it('refuses what the in-process reader refuses, with the same codes', async () => {
    const cases: [string, Options?][] = [
      ['site,time,state\nx,1,a\nx,,b\n'],
      ['site,time,state\nx,1,a\nx,2,\n'],
      ['site,time,state\nx,1,a\nx,2.5,b\n'],
      ['site,time,state\nx,1,a\nx,2,b\nx,2,a\n'],
      ['site,time,state\nx,1,a\nx,2,A\n'],
      ['site,time,state\nx,1,a\nx,2,b\u200b\n'],
      ['site,time,state\nx\u200b,1,a\nx,2,b\ny,1,b\n'],
      ['site,time,state\nx,1,a\nx,2,a\n'],
      ['site,time,state\nx,1,a\nx,2,b\nx,3,c\n', { ...defaults, states: ['a', 'b'] }],
      ['site,when,state\nx,1,a\nx,2,b\n'],
      ['site;time;state\nx;1;a\nx;2;b\n'],
      ['site,time,state,state\nx,1,a,a\nx,2,b,b\n'],
    ];
    const codes: string[] = [];
    for (const [text, o] of cases) {
      const input = file(text);
      const expected = inProcess([input], o);
      expect(expected).toMatch(/^[A-Z_]+$/);
      expect(await duck([input], o)).toBe(expected);
      codes.push(expected);
    }
    expect(codes).toEqual(['EMPTY_VALUE', 'EMPTY_VALUE', 'BAD_TIME', 'DUPLICATE_SURVEY', 'STATE_CASE_CLASH',
      'INVISIBLE_CHARACTER', 'INVISIBLE_CHARACTER', 'TOO_FEW_STATES', 'UNKNOWN_STATE', 'MISSING_COLUMN', 'MISSING_COLUMN', 'DUPLICATE_COLUMN']);
  });

  it('names the line (and column) the in-process reader names, found again in the CSV file', async () => {
    const place = async (run: () => unknown): Promise<unknown> => {
      try {
        await run();
        return undefined;
      } catch (err) {
        const { code, place: { file: f, line, column } } = err as SereError;
        return { code, file: f, line, column };
      }
    };
    const cases: [string, Options?][] = [
      ['site,time,state\nx,1,a\ny,1,b\nx,,b\n'],
      ['site,time,state\nx,1,a\nx,2,b\n\ny,1,a\nx,2.5,b\n'],
      ['site,time,state\nx,1,a\nx,2,b\ny,1,a\nx,2,a\n'],
      ['site,time,state\nx,1,a\ny,1,b\nx,2,A\n'],
      ['site,time,state\nx,1,a\nx,2,b\ny,1,"b\u200b"\n'],
      ['site,time,state\nx,1,a\nx,2,b\ny\u200b,1,b\n'],
      ['site,time,state\nx,1,a\nx,2,b\nx,3,c\n', { ...defaults, states: ['a', 'b'] }],
      ['site,time,state,zone\nx,1,a,n\nx,2,b,n\ny,1,b,s\u200b\n', { ...defaults, columns: { ...DEFAULT_COLUMNS, group: 'zone' } }],
      // A site id that needs trimming sends the check down the normalising path; states and groups are then decided once, after it.
      ['site,time,state\n x,1,a\ny,1,b\nx,2,A\n'],
      ['site,time,state,zone\n x,1,a,n\nx,2,b,n\ny,1,b,s\u200b\n', { ...defaults, columns: { ...DEFAULT_COLUMNS, group: 'zone' } }],
    ];
    const places: unknown[] = [];
    for (const [text, o = defaults] of cases) {
      const input = file(text);
      const expected = await place(() => readSurveyTables([input], { columns: o.columns, states: o.states }));
      expect(expected).toMatchObject({ file: input });
      expect(await place(() => countWithDuckDb([input], { columns: o.columns, step: 1, perSite: false, states: o.states }))).toEqual(expected);
      places.push(expected);
    }
    expect(places.map((p) => [(p as { code: string }).code, (p as { line: number }).line])).toEqual([['EMPTY_VALUE', 4], ['BAD_TIME', 6],
      ['DUPLICATE_SURVEY', 5], ['STATE_CASE_CLASH', 4], ['INVISIBLE_CHARACTER', 4], ['INVISIBLE_CHARACTER', 4], ['UNKNOWN_STATE', 4], ['INVISIBLE_CHARACTER', 4],
      ['STATE_CASE_CLASH', 4], ['INVISIBLE_CHARACTER', 4]]);
  });

  it('reads what the in-process reader reads: a BOM, CRLF, blank lines, quoted fields, white space trimmed', async () => {
    const input = file('\uFEFFsite,time,state\r\nx,1,"a"\r\n\r\n"x",2,b\t\r\ny,1, b \r\ny,3,a\u00a0\r\n');
    const expected = inProcess([input]);
    // Header, two first surveys, two pairs, two last surveys, and the final newline.
    expect(expected.split('\n').length).toBe(8);
    expect(await duck([input])).toBe(expected);
  });

  it('a Parquet file without the columns: one error naming the file and the column', async () => {
    const parquet = join(dir, 'nocol.parquet');
    const db = await (await DuckDBInstance.create(':memory:')).connect();
    await db.run(`COPY (SELECT 'x' AS plot, 1 AS time, 'a' AS state) TO '${parquet}' (FORMAT parquet)`);
    db.closeSync();
    try {
      await countWithDuckDb([parquet], { columns: DEFAULT_COLUMNS, step: 1, perSite: false });
      expect.unreachable();
    } catch (err) {
      expect((err as SereError).code).toBe('MISSING_COLUMN');
      expect((err as SereError).place.file).toBe(parquet);
      expect((err as SereError).message).toContain("'site'");
    }
  });
});
