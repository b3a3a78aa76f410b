import { closeSync, mkdtempSync, openSync, readSync, rmSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { tmpdir } from 'node:os';
import { extname, join } from 'node:path';
import { DuckDBInstance, DuckDBPendingResultState, type DuckDBConnection } from '@duckdb/node-api';
import { SereError, quote } from '../errors.js';
import { compareCodePoints } from '../data/code-points.js';
import { FIRST_SURVEY, LAST_SURVEY, sortCells, sortSiteCells, type CountCell, type CountsTable, type SiteCell } from '../data/counts-table.js';
import { labelProblem, MAX_LABEL_LENGTH, normaliseLabel } from '../data/labels.js';
import { StateLabels } from '../data/states.js';
import { checkRegularFile } from '../data/read-text-file.js';
import type { SurveyColumns } from '../data/survey.js';
import { columnIndex, missingColumn } from '../data/survey-header.js';
import { findSurveyLine, type SurveyRole, type SurveyRowText } from '../data/find-survey-line.js';
import { countingSql } from './count-query.js';
import { settingName } from '../setting-name.js';

export interface DuckDbCountOptions {
  readonly columns: SurveyColumns;
  readonly step: number;
  readonly states?: readonly string[];
  readonly perSite: boolean;
  /** Called with the fraction done of the counting query (tests and the CLI's bar). */
  readonly onProgress?: (fraction: number) => void;
}

const WHAT = 'survey table';

/**
 * Count survey tables (CSV or Parquet, several read as one) with embedded DuckDB: out of core,
 * on every core, for tables too big to hold. The counting itself is the portable query of
 * count-query.ts, run over a view that reads the files with states and groups as integer codes
 * and site ids and times normalised as the in-process reader normalises them (trimmed, labels in
 * NFC, times whole numbers) — only where a value needs it (codedSurveys). The checks give the same
 * outcomes (error codes) as the in-process reader: empty values, times that are not whole,
 * labels with invisible characters or too long (labels.ts), states as states.ts decides them, and
 * a site surveyed twice at one time in two states; exact repeats are dropped and counted.
 * DuckDB keeps no line numbers: a problem in a CSV file is then found again by one streaming pass
 * of the survey reader's own scanner (data/find-survey-line.ts), so the message names the file,
 * line and column the in-process reader would; in a Parquet file, the file and the site and time.
 */
export async function countWithDuckDb(files: readonly string[], options: DuckDbCountOptions): Promise<CountsTable> {
  for (const f of files) checkRegularFile(f, WHAT);
  // Out of core: when the window's sort outgrows DuckDB's memory limit (80% of RAM unless set), it
  // spills to this folder — a fresh one under the system's temp folder, never the working folder.
  const spill = mkdtempSync(join(tmpdir(), 'sere-duckdb-'));
  const instance = await DuckDBInstance.create(':memory:', { temp_directory: spill });
  const db = await instance.connect();
  try {
    await db.run('SET preserve_insertion_order = false; SET enable_progress_bar = true; SET enable_progress_bar_print = false');
    for (const f of files) await checkColumns(db, f, options.columns);
    const g = options.columns.group !== undefined;
    const fileNames = files.join(', ');
    const coded = await codedSurveys(db, files, fileNames, options);
    const place = placer(files, options.columns);
    const sql = countingSql({ table: 'sere_coded', columns: { site: 'site', time: 'time', state: 'state', ...(g ? { group: 'site_group' } : {}) }, step: options.step, perSite: options.perSite });
    const result = await withProgress(db, sql, options);
    const cells: CountCell[] = [];
    const siteCells: SiteCell[] = [];
    let repeated = 0;
    for (const r of result) {
      const from = r.from_state === null ? FIRST_SURVEY : Number(r.from_state);
      const to = r.to_state === null ? LAST_SURVEY : Number(r.to_state);
      const gap = r.gap === null ? 0 : Number(r.gap);
      const n = Number(r.n);
      const group = g ? { group: coded.groups[Number(r.site_group)]! } : {};
      const pooled = !options.perSite || r.site === null || r.site === undefined;
      if (to === LAST_SURVEY) {
        cells.push({ ...group, from, to, gap: 0, time: Number(r.to_time), n, line: 0 });
        continue;
      }
      if (from !== FIRST_SURVEY && gap === 0) {
        // An exact repeat (count-query.ts): used once. Two states at one time: refused.
        if (from !== to) await contradiction(db, fileNames, coded, place);
        if (pooled) repeated += n;
        continue;
      }
      if (!pooled) {
        siteCells.push({ site: String(r.site), ...group, from, to, gap, n, line: 0 });
        continue;
      }
      cells.push({ ...group, from, to, gap, time: Number(r.to_time), n, line: 0 });
    }
    sortSiteCells(siteCells);
    return {
      file: fileNames, sha256: '', states: coded.states, step: options.step, grouped: g,
      cells: sortCells(cells), ...(options.perSite ? { siteCells } : {}), repeatedRows: repeated,
    };
  } finally {
    db.closeSync();
    instance.closeSync();
    rmSync(spill, { recursive: true, force: true });
  }
}

/** The surveys as the counting query reads them (view sere_coded): states and groups as integer codes. */
interface CodedSurveys {
  /** The states: a state's code is its index here. */
  readonly states: readonly string[];
  /** Group label of each group code. */
  readonly groups: readonly string[];
}

/** A site id or label that needs no work: printable ASCII, no space at either end, not too long. */
const PLAIN = (column: string): string => `regexp_full_match(${column}, '[!-~]([ -~]{0,${MAX_LABEL_LENGTH - 2}}[!-~])?')`;
/** A time that needs no work: a whole number of at most 18 digits (always a BIGINT). */
const PLAIN_TIME = (column: string): string => `regexp_full_match(${column}, '[+-]?[0-9]{1,18}')`;

/**
 * Check the rows and build the view the counting query reads. Measured with `npm run bench -- count`
 * (10⁷ Parquet rows): trimming and NFC-ing every value in the view, and the window sorting the
 * normalised strings, took 21 s; this takes under 3 s. So:
 *
 * 1. One pass over the raw rows, grouped by raw state and group, counts the rows whose site or time
 *    is not plain (PLAIN, PLAIN_TIME: most tables have none).
 * 2. The distinct raw states and groups are few: each is trimmed and NFC-ed here, by the in-process
 *    reader's own rules (labels.ts, states.ts), once, and becomes an integer code (a CASE in the view).
 * 3. Any row that is not plain (or a state or group that is empty once trimmed) sends the check
 *    to the full normalising one (checkRows), which throws the first problem ranked as the
 *    in-process reader ranks them; when it finds none (accented site ids, times with spaces), only
 *    the rows that are not plain are normalised in the view.
 *
 * The window then sorts plain strings and integers.
 */
async function codedSurveys(db: DuckDBConnection, files: readonly string[], fileNames: string, options: DuckDbCountOptions): Promise<CodedSurveys> {
  const { columns } = options;
  const g = columns.group !== undefined;
  const types = new Map((await db.runAndReadAll(`DESCRIBE SELECT * FROM ${source(files)}`)).getRowObjects()
    .map((r) => [String(r['column_name']), String(r['column_type'])] as const));
  // A whole-number column (Parquet) is taken as it is; anything else as text, as a CSV's.
  const integerTime = /^U?(TINYINT|SMALLINT|INTEGER|BIGINT)$/.test(types.get(columns.time) ?? '');
  await db.run(`CREATE VIEW sere_raw AS SELECT CAST(${q(columns.site)} AS VARCHAR) AS site,
    ${integerTime ? `CAST(${q(columns.time)} AS BIGINT)` : `CAST(${q(columns.time)} AS VARCHAR)`} AS time_raw,
    CAST(${q(columns.state)} AS VARCHAR) AS state${g ? `, CAST(${q(columns.group!)} AS VARCHAR) AS site_group` : ''}
    FROM ${source(files)}`);
  const summary = (await db.runAndReadAll(`SELECT state, ${g ? 'site_group' : 'NULL AS site_group'},
    COUNT(*) FILTER (WHERE site IS NULL OR NOT ${PLAIN('site')}) AS odd_site,
    COUNT(*) FILTER (WHERE time_raw IS NULL${integerTime ? '' : ` OR NOT ${PLAIN_TIME('time_raw')}`}) AS odd_time
    FROM sere_raw GROUP BY ALL`)).getRowObjects();
  const clean = (value: unknown): string => (value === null ? '' : normaliseLabel(String(value).trim()));
  const oddSites = summary.some((r) => Number(r['odd_site']) > 0);
  const oddTimes = summary.some((r) => Number(r['odd_time']) > 0);
  const oddLabels = summary.some((r) => clean(r['state']) === '' || (g && clean(r['site_group']) === ''));
  if (oddSites || oddTimes || oddLabels) {
    // The full check, as before: it throws the problem the in-process reader would report first.
    await db.run(`CREATE VIEW sere_surveys AS SELECT
      nfc_normalize(${trimmed('site')}) AS site,
      ${trimmed('time_raw')} AS time_text,
      -- Whole numbers only, as parse-time.ts reads them (TRY_CAST alone would round '2.5').
      CASE WHEN regexp_full_match(${trimmed('time_raw')}, '[+-]?[0-9]+') THEN TRY_CAST(${trimmed('time_raw')} AS BIGINT) END AS time,
      nfc_normalize(${trimmed('state')}) AS state
      ${g ? `, nfc_normalize(${trimmed('site_group')}) AS site_group` : ''}
      FROM sere_raw`);
    await checkRows(db, fileNames, g, options, placer(files, columns));
  }
  // States: the distinct labels, in code-point order, decided by states.ts as for any survey table.
  const rawStates = [...new Set(summary.map((r) => String(r['state'])))];
  const distinct = [...new Set(rawStates.map(clean))].sort(compareCodePoints);
  const { provisional, states, index } = decideStates(distinct, fileNames, options.states, placer(files, columns));
  const rawGroups = g ? [...new Set(summary.map((r) => String(r['site_group'])))] : [];
  const groups = [...new Set(rawGroups.map(clean))].sort(compareCodePoints);
  for (const group of groups) {
    const problem = labelProblem(group, () => `group ${quote(group)}`);
    if (problem) throw placer(files, columns)(new SereError(problem.code, problem.what, { file: fileNames }, problem.hint), 'group', (r) => r.group === group);
  }
  const groupCode = new Map(groups.map((l, i) => [l, i] as const));
  const site = oddSites ? `CASE WHEN ${PLAIN('site')} THEN site ELSE nfc_normalize(${trimmed('site')}) END` : 'site';
  const time = integerTime ? 'time_raw'
    : oddTimes ? `CASE WHEN ${PLAIN_TIME('time_raw')} THEN CAST(time_raw AS BIGINT) ELSE CAST(${trimmed('time_raw')} AS BIGINT) END` : 'CAST(time_raw AS BIGINT)';
  const code = (column: string, raws: readonly string[], codeOf: (raw: string) => number): string =>
    `CASE ${column} ${raws.map((raw) => `WHEN ${literal(raw)} THEN ${codeOf(raw)}`).join(' ')} END`;
  await db.run(`CREATE VIEW sere_coded AS SELECT ${site} AS site, ${time} AS time,
    ${code('state', rawStates, (raw) => index[provisional.get(clean(raw))!]!)} AS state
    ${g ? `, ${code('site_group', rawGroups, (raw) => groupCode.get(clean(raw))!)} AS site_group` : ''}
    FROM sere_raw`);
  return { states, groups };
}

/** A text column trimmed of what the in-process reader trims: JavaScript's String.prototype.trim white space. */
function trimmed(column: string): string {
  return `trim(CAST(${column} AS VARCHAR), ${literal(JS_WHITE_SPACE)})`;
}

/** The characters String.prototype.trim removes (ECMAScript WhiteSpace and LineTerminator). */
const JS_WHITE_SPACE = ' \t\n\v\f\r\u00a0\u1680\u2000\u2001\u2002\u2003\u2004\u2005\u2006\u2007\u2008\u2009\u200a\u2028\u2029\u202f\u205f\u3000\ufeff';

/** A double-quoted DuckDB identifier (column names are the user's, any text). */
function q(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** A single-quoted SQL string. */
function literal(text: string): string {
  return `'${text.replace(/'/g, "''")}'`;
}

function isParquet(file: string): boolean {
  return extname(file).toLowerCase() === '.parquet';
}

/** Every file as text columns (CSV) or as stored (Parquet), CSV and Parquet files together. */
function source(files: readonly string[]): string {
  const csv = files.filter((f) => !isParquet(f));
  const parquet = files.filter(isParquet);
  const parts = [
    // Commas and double quotes only, as the in-process reader: DuckDB would otherwise sniff a semicolon file as valid.
    ...(csv.length ? [`SELECT * FROM read_csv([${csv.map(literal).join(', ')}], header = true, all_varchar = true, union_by_name = true, delim = ',', quote = '"', escape = '"')`] : []),
    ...(parquet.length ? [`SELECT * FROM read_parquet([${parquet.map(literal).join(', ')}], union_by_name = true)`] : []),
  ];
  return parts.length === 1 ? `(${parts[0]})` : `(${parts.join(' UNION ALL BY NAME ')})`;
}

/** Each file has the named columns: else one line naming the file and the missing column. */
async function checkColumns(db: DuckDBConnection, file: string, columns: SurveyColumns): Promise<void> {
  // A CSV header is checked as the in-process reader checks it (survey-header.ts): the same
  // errors for a missing or repeated column, a semicolon file, with the line.
  if (!isParquet(file)) columnIndex(file, csvHeader(file), 1, columns);
  let names: string[];
  try {
    const described = await db.runAndReadAll(`DESCRIBE SELECT * FROM ${source([file])}`);
    names = described.getRowObjects().map((r) => String(r['column_name']));
  } catch (err) {
    throw new SereError('NOT_CSV', `DuckDB cannot read it as ${isParquet(file) ? 'Parquet' : 'CSV'} (${(err as Error).message.split('\n')[0]!.slice(0, 160)})`,
      { file }, isParquet(file) ? 'check that the file is a Parquet file' : 'save the survey table as comma-separated values with a header row');
  }
  const wanted: [string, string | undefined][] = [['site', columns.site], ['time', columns.time], ['state', columns.state], ['group', columns.group]];
  for (const [role, name] of wanted) {
    if (name !== undefined && !names.includes(name)) {
      throw new SereError('MISSING_COLUMN', `${missingColumn(name, role)} (columns: ${names.map(quote).join(', ')})`, { file },
        `name the column that holds the ${role} with ${settingName(`--${role}-column`, `fit.columns.${role}`)}`);
    }
  }
}

/**
 * One pass over the rows for what the in-process reader checks row by row: empty values, times and
 * site labels (state and group labels are then decided once, by codedSurveys).
 */
async function checkRows(db: DuckDBConnection, file: string, grouped: boolean, options: DuckDbCountOptions, place: Placer): Promise<void> {
  // Only printable ASCII up to the length limit is surely fine; the rest (rare) are checked by labels.ts.
  // Measured on 10⁷ rows: 0.3 s, where a \p{Cc}\p{Cf} regular expression on every row took 1.2 s.
  const suspect = (column: string): string => `(strlen(${column}) > ${MAX_LABEL_LENGTH} OR NOT (${column} SIMILAR TO '[ -~]*'))`;
  const empty = `(site IS NULL OR site = '' OR time_text IS NULL OR time_text = '' OR state IS NULL OR state = ''${grouped ? " OR site_group IS NULL OR site_group = ''" : ''})`;
  const summary = await db.runAndReadAll(`SELECT state, ${grouped ? 'site_group' : 'NULL AS site_group'}, COUNT(*) AS n,
    COUNT(*) FILTER (WHERE ${empty}) AS empty,
    COUNT(*) FILTER (WHERE NOT ${empty} AND time IS NULL) AS bad_time,
    COUNT(*) FILTER (WHERE ${suspect('site')}) AS suspect_site
    FROM sere_surveys GROUP BY ALL`);
  const rows = summary.getRowObjects();
  const sum = (key: string): number => rows.reduce((a, r) => a + Number(r[key]), 0);
  if (sum('empty') > 0) {
    const example = await one(db, `SELECT site, time_text, state FROM sere_surveys WHERE ${empty} LIMIT 1`);
    const which = !example['site'] ? options.columns.site : !example['time_text'] ? options.columns.time : !example['state'] ? options.columns.state : options.columns.group!;
    const role: SurveyRole = which === options.columns.site ? 'site' : which === options.columns.time ? 'time' : which === options.columns.state ? 'state' : 'group';
    const site = example['site'] ? String(example['site']) : undefined;
    throw place(new SereError('EMPTY_VALUE', `${sum('empty')} row${sum('empty') === 1 ? ' has' : 's have'} no ${which}${site ? ` (site ${quote(site)})` : ''}`,
      { file }, `fill in the ${which} of every row, or remove the rows`), role, (r) => r[role] === '' && (site === undefined || r.site === site));
  }
  if (sum('bad_time') > 0) {
    const example = await one(db, 'SELECT site, time_text FROM sere_surveys WHERE time IS NULL LIMIT 1');
    const [site, time] = [String(example['site']), String(example['time_text'])];
    throw place(new SereError('BAD_TIME', `time ${quote(time)} of site ${quote(site)} is not a whole number`,
      { file }, 'write survey times as whole numbers (years, or season numbers)'), 'time', (r) => r.site === site && r.time === time);
  }
  if (sum('suspect_site') > 0) {
    const suspects = await db.runAndReadAll(`SELECT DISTINCT site FROM sere_surveys WHERE ${suspect('site')} ORDER BY site`);
    for (const [value] of suspects.getRows()) {
      const site = String(value);
      const problem = labelProblem(site, () => `site ${quote(site)}`);
      if (problem) throw place(new SereError(problem.code, problem.what, { file }, problem.hint), 'site', (r) => r.site === site);
    }
  }
  // States and groups are decided next by codedSurveys, on the same trimmed, NFC labels: not twice.
}

/**
 * The states of the distinct labels (in code-point order), decided by states.ts as for any survey
 * table. Each label is seen at "line" n + 1, its place in the list: an error naming that line is
 * about that label, whose first row in the file is then found for the message.
 */
function decideStates(distinct: readonly string[], file: string, declared: readonly string[] | undefined, place: Placer):
  { provisional: Map<string, number>; states: readonly string[]; index: ArrayLike<number> } {
  const labels = new StateLabels(file, declared);
  const provisional = new Map<string, number>();
  try {
    distinct.forEach((label, n) => provisional.set(label, labels.see(label, n + 1, 0)));
    return { provisional, ...labels.finish() };
  } catch (err) {
    if (!(err instanceof SereError)) throw err;
    const line = err.place.line;
    if (line === undefined || !(line >= 1 && line <= distinct.length)) throw err;
    const label = distinct[line - 1]!;
    const placed = place(new SereError(err.code, err.message, { file }, err.hint), 'state', (r) => r.state === label);
    if (placed.place.line !== undefined) inFileOrder(distinct, placed.place.file!, declared, place);
    throw placed;
  }
}

/**
 * The states decided again as the in-process reader decides them — each label seen at its first
 * line, in file order — so that an error naming two labels (a case clash, a look-alike) names the
 * same two, with their lines. One pass over the file, on the error path only; throws that error.
 */
function inFileOrder(distinct: readonly string[], file: string, declared: readonly string[] | undefined, place: Placer): void {
  const first = new Map<string, number>();
  const wanted = new Set(distinct);
  const column = place.column(file, 'state');
  place.scan(file, (r, line) => {
    if (wanted.has(r.state) && !first.has(r.state)) first.set(r.state, line);
    return first.size === wanted.size;
  });
  if (first.size !== wanted.size || column === undefined) return;
  const labels = new StateLabels(file, declared);
  for (const [label, line] of [...first].sort((a, b) => a[1] - b[1])) labels.see(label, line, column);
  labels.finish();
}

/** Find the first row of a problem in the CSV files (find-survey-line.ts) and put it in the error. */
interface Placer {
  (error: SereError, role: SurveyRole, matches: (row: SurveyRowText) => boolean): SereError;
  /** One pass over a file's rows, until `visit` returns true. */
  scan(file: string, visit: (row: SurveyRowText, line: number) => boolean): void;
  /** The 1-based column of a role in a file (from its first row). */
  column(file: string, role: SurveyRole): number | undefined;
}

function placer(files: readonly string[], columns: SurveyColumns): Placer {
  const place = (error: SereError, role: SurveyRole, matches: (row: SurveyRowText) => boolean): SereError => {
    for (const file of files.filter((f) => !isParquet(f))) {
      const found = findSurveyLine(file, columns, role, matches);
      if (found) return new SereError(error.code, error.message, { file, line: found.line, column: found.column }, error.hint);
    }
    return error;
  };
  return Object.assign(place, {
    scan: (file: string, visit: (row: SurveyRowText, line: number) => boolean): void => void findSurveyLine(file, columns, 'site', visit),
    column: (file: string, role: SurveyRole): number | undefined => findSurveyLine(file, columns, role, () => true)?.column,
  });
}

/** The first site surveyed twice at one time in two states, as the in-process reader refuses it. */
async function contradiction(db: DuckDBConnection, file: string, coded: CodedSurveys, place: Placer): Promise<never> {
  const r = await one(db, `SELECT site, time, MIN(state) AS a, MAX(state) AS b FROM (SELECT DISTINCT site, time, state FROM sere_coded)
    GROUP BY site, time HAVING COUNT(DISTINCT state) > 1 ORDER BY site, time LIMIT 1`);
  const label = (code: unknown): string => coded.states[Number(code)]!;
  const [site, time] = [String(r['site']), Number(r['time'])];
  // The second of the two rows, as the in-process reader names it.
  let first: string | undefined;
  const error = place(new SereError('DUPLICATE_SURVEY', `site ${quote(site)} at time ${time} is ${quote(label(r['a']))} in one row and ${quote(label(r['b']))} in another`,
    { file }, 'keep one of the two rows'), 'state', (row) => {
    if (row.site !== site || Number(row.time) !== time) return false;
    first ??= row.state;
    return row.state !== first;
  });
  throw error.place.line === undefined ? error : new SereError(error.code, error.message, { file: error.place.file, line: error.place.line }, error.hint);
}

async function one(db: DuckDBConnection, sql: string): Promise<Record<string, unknown>> {
  return (await db.runAndReadAll(sql)).getRowObjects()[0] as Record<string, unknown>;
}

/**
 * Run the counting query task by task, reporting DuckDB's own estimate of the fraction done
 * (query_progress) between tasks, so a bar can move while a 10⁸-row count runs.
 */
async function withProgress(db: DuckDBConnection, sql: string, options: DuckDbCountOptions): Promise<Record<string, unknown>[]> {
  const pending = await db.start(sql);
  let last = -1;
  for (;;) {
    const state = pending.runTask();
    if (state === DuckDBPendingResultState.RESULT_READY) break;
    const fraction = db.progress.percentage / 100;
    if (fraction >= 0 && fraction - last >= 0.01) {
      last = fraction;
      options.onProgress?.(fraction);
    }
    // Let the event loop breathe (and DuckDB's threads work) between tasks.
    if (state === DuckDBPendingResultState.NO_TASKS_AVAILABLE) await new Promise((r) => setTimeout(r, 5));
  }
  options.onProgress?.(1);
  const result = await pending.getResult();
  return (await result.getRowObjects()) as Record<string, unknown>[];
}

/** The header fields of a CSV file: its first record, from the first MiB, as csv-parse reads it. */
function csvHeader(file: string): string[] {
  const fd = openSync(file, 'r');
  try {
    const buffer = Buffer.alloc(1 << 20);
    const bytes = readSync(fd, buffer, 0, buffer.length, 0);
    const text = buffer.subarray(0, bytes).toString('utf8');
    const [first] = parse(text, { bom: true, trim: true, to_line: 1, skip_empty_lines: true, relax_column_count: true }) as string[][];
    return first ?? [];
  } finally {
    closeSync(fd);
  }
}
