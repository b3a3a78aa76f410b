import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import initSqlJs from 'sql.js';
import { stringify } from 'csv-stringify/sync';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, describe, expect, it } from 'vitest';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import { readCountsCsv } from '../../src/data/read-counts-csv.js';
import { DEFAULT_COLUMNS, type SurveyColumns } from '../../src/data/survey.js';
import { tallyCounts } from '../../src/chain/tally-counts.js';
import { countsCsv } from '../../src/data/counts-csv.js';
import { SereError } from '../../src/errors.js';
import { sereInProcess } from '../cli/in-process.js';

/**
 * `sere count --sql` prints one query; run unchanged on two different embedded engines — DuckDB
 * and SQLite (sql.js: SQLite compiled to WebAssembly; window functions since SQLite 3.25) — its
 * result, saved as CSV, is the counts table the in-process counter writes.
 */
const dir = mkdtempSync(join(tmpdir(), 'sere-sql-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let files = 0;
const SQL = await initSqlJs();

interface Case { step: number; perSite: boolean; columns: SurveyColumns }

async function printedSql(c: Case, table: string): Promise<string> {
  const args = ['count', '--sql', '--table', table, '--step', String(c.step), '--site-column', c.columns.site,
    '--time-column', c.columns.time, '--state-column', c.columns.state];
  if (c.columns.group) args.push('--group-column', c.columns.group);
  if (c.perSite) args.push('--per-site');
  const r = await sereInProcess(args);
  expect(r.code).toBe(0);
  return r.stdout;
}

interface Survey { site: string; time: number; state: string; group?: string }

/** A result set saved as CSV with its header, then read as a counts table and written canonically. */
function asCountsTable(columns: string[], rows: unknown[][]): string {
  const path = join(dir, `r${files++}.csv`);
  writeFileSync(path, stringify([columns, ...rows.map((r) => r.map((v) => (v === null || v === undefined ? '' : typeof v === 'bigint' ? String(v) : v)))]));
  try {
    return countsCsv(readCountsCsv(path));
  } catch (err) {
    if (err instanceof SereError) return err.code;
    throw err;
  }
}

async function onDuckDb(sql: string, table: string, rows: readonly Survey[], c: Case): Promise<string> {
  const db = await (await DuckDBInstance.create(':memory:')).connect();
  const g = c.columns.group;
  await db.run(`CREATE TABLE ${table} (${c.columns.site} VARCHAR, ${c.columns.time} BIGINT, ${c.columns.state} VARCHAR${g ? `, ${g} VARCHAR` : ''})`);
  const appender = await db.createAppender(table);
  for (const r of rows) {
    appender.appendVarchar(r.site);
    appender.appendBigInt(BigInt(r.time));
    appender.appendVarchar(r.state);
    if (g) appender.appendVarchar(r.group!);
    appender.endRow();
  }
  appender.closeSync();
  const result = await db.runAndReadAll(sql);
  const out = asCountsTable(result.columnNames(), result.getRows() as unknown[][]);
  db.closeSync();
  return out;
}

function onSqlite(sql: string, table: string, rows: readonly Survey[], c: Case): string {
  const db = new SQL.Database();
  const g = c.columns.group;
  db.run(`CREATE TABLE ${table} (${c.columns.site} TEXT, ${c.columns.time} INTEGER, ${c.columns.state} TEXT${g ? `, ${g} TEXT` : ''})`);
  const insert = db.prepare(`INSERT INTO ${table} VALUES (?, ?, ?${g ? ', ?' : ''})`);
  for (const r of rows) insert.run([r.site, r.time, r.state, ...(g ? [r.group!] : [])]);
  insert.free();
  const [result] = db.exec(sql);
  db.close();
  return asCountsTable(result!.columns, result!.values);
}

/** The in-process counts table of the same rows, from a survey CSV. */
function inProcess(rows: readonly Survey[], c: Case): string {
  const path = join(dir, `s${files++}.csv`);
  const { site, time, state, group } = c.columns;
  writeFileSync(path, stringify([[site, time, state, ...(group ? [group] : [])], ...rows.map((r) => [r.site, r.time, r.state, ...(group ? [r.group!] : [])])]));
  try {
    return countsCsv(tallyCounts(readSurveyCsv(path, { columns: c.columns }), { step: c.step, perSite: c.perSite }));
  } catch (err) {
    if (err instanceof SereError) return err.code;
    throw err;
  }
}

async function expectPortable(rows: readonly Survey[], c: Case, table = 'surveys'): Promise<string> {
  const sql = await printedSql(c, table);
  const expected = inProcess(rows, c);
  expect(onSqlite(sql, table, rows, c)).toBe(expected);
  expect(await onDuckDb(sql, table, rows, c)).toBe(expected);
  return expected;
}

describe('the printed counting SQL runs unchanged on DuckDB and SQLite', () => {
  it('on the demo table, by zone, per site, with other column and table names', async () => {
    const [, ...lines] = readFileSync('scenarios/brenhollow/surveys.csv', 'utf8').trim().split('\n');
    const rows = lines.map((l) => l.split(',')).map(([site, time, state, group]) => ({ site: site!, time: Number(time), state: state!, group: group! }));
    const expected = await expectPortable(rows, { step: 1, perSite: true, columns: { site: 'plot', time: 'yr', state: 'cover', group: 'zone' } }, 'field_surveys');
    expect(expected.split('\n').length).toBeGreaterThan(300);
    await expectPortable(rows, { step: 1, perSite: false, columns: DEFAULT_COLUMNS });
  });

  it('on random tables: irregular gaps, steps of 1–3, repeats and contradictions (property)', async () => {
    const table = fc.record({
      step: fc.integer({ min: 1, max: 3 }),
      grouped: fc.boolean(),
      perSite: fc.boolean(),
      rows: fc.array(fc.record({ site: fc.integer({ min: 0, max: 8 }), time: fc.integer({ min: 0, max: 10 }), state: fc.constantFrom('a', 'b', 'c') }),
        { minLength: 1, maxLength: 50 }),
      repeat: fc.nat({ max: 2 }),
      contradict: fc.boolean(),
    });
    await fc.assert(fc.asyncProperty(table, async ({ step, grouped, perSite, rows, repeat, contradict }) => {
      const unique = [...new Map(rows.map((r) => [`${r.site} ${r.time}`, r])).values()];
      const surveys: Survey[] = unique.map((r) => ({ site: `p${r.site}`, time: r.time, state: r.state, group: `z${(r.site + (r.time > 7 ? 1 : 0)) % 2}` }));
      surveys.push(...surveys.slice(0, repeat));
      if (contradict) surveys.push({ ...surveys[0]!, state: 'zz' });
      await expectPortable(surveys, { step, perSite, columns: { ...DEFAULT_COLUMNS, ...(grouped ? { group: 'zone' } : {}) } });
    }), { numRuns: 30, seed: 20261202 });
  });

  it('refuses names it cannot write unquoted', async () => {
    const r = await sereInProcess(['count', '--sql', '--group-column', 'group', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_SQL_NAME]');
    expect((await sereInProcess(['count', '--sql', '--table', 'x; drop table y', '--debug'])).stderr).toContain('[BAD_SQL_NAME]');
    expect((await sereInProcess(['count', '--sql', '--table', 'lake.field.surveys'])).code).toBe(0);
  });
});
