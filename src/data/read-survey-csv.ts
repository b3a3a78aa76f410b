import { parse } from 'csv-parse/sync';
import { SereError, quote, type Place } from '../errors.js';
import { labelProblem, normaliseLabel } from './labels.js';
import { readTextFile } from './read-text-file.js';
import { resolveStates, type StateResolver } from './states.js';
import type { SurveyColumns, SurveyRecord, SurveyTable } from './survey.js';

export interface ReadSurveyOptions {
  readonly columns: SurveyColumns;
  /** Declared states, in the user's order; when absent, states are inferred and sorted. */
  readonly states?: readonly string[];
  /** Where `states` was declared (a flag, or a scenario key), for messages; default --states. */
  readonly statesPlace?: Place;
  /** One of several tables read as one (see read-survey-tables.ts): it may hold a single state. */
  readonly partOfSeveral?: boolean;
}

export interface RawRow {
  readonly fields: readonly string[];
  readonly line: number;
}

const INTEGER = /^[+-]?\d+$/;

/**
 * Read a long survey table (one row per site and survey) and validate it completely before any
 * counting: every problem is reported with the file, the line and the column, and nothing is
 * written when one is found.
 */
export function readSurveyCsv(file: string, options: ReadSurveyOptions): SurveyTable {
  const { text, sha256 } = readTextFile(file, 'survey table');
  if (text.trim() === '') {
    throw new SereError('EMPTY_FILE', 'the survey table is empty', { file },
      'add a header row (site,time,state) and one row per site and survey');
  }
  const rows = parseRows(file, text);
  const header = rows[0]!;
  const index = columnIndex(file, header, options.columns);
  const body = normaliseLabels(file, rows.slice(1), index);
  if (body.length === 0) {
    throw new SereError('EMPTY_FILE', 'the survey table has a header but no survey rows', { file, line: header.line },
      'add one row per site and survey below the header');
  }

  const labels: { label: string; line: number; column: number }[] = [];
  for (const row of body) {
    for (const [key, at] of Object.entries(index) as [keyof SurveyColumns, number][]) {
      if (key === 'group') continue;
      if (row.fields[at] === '') {
        throw new SereError('EMPTY_VALUE', `empty ${key} in column ${at + 1} (${quote(header.fields[at]!)})`,
          { file, line: row.line, column: at + 1 }, `fill in the ${key} or remove the row`);
      }
    }
    const time = row.fields[index.time]!;
    if (!INTEGER.test(time)) {
      throw new SereError('BAD_TIME', `time ${quote(time)} in column ${index.time + 1} is not a whole number`,
        { file, line: row.line, column: index.time + 1 }, 'write survey times as integers such as 2024');
    }
    if (!Number.isSafeInteger(Number(time))) {
      // Beyond 2^53 a double cannot hold every integer: 9007199254740993 would be read as …992.
      throw new SereError('BAD_TIME', `time ${quote(time)} in column ${index.time + 1} is beyond ±${Number.MAX_SAFE_INTEGER}, the largest whole number sere counts exactly`,
        { file, line: row.line, column: index.time + 1 }, 'write survey times as years, or count from a nearer origin (e.g. days since 2000-01-01)');
    }
    labels.push({ label: row.fields[index.state]!, line: row.line, column: index.state + 1 });
  }

  const resolver = resolveStates(file, labels, options.states, options.partOfSeveral ? 1 : 2, options.statesPlace);
  const { unique, repeated } = withoutDuplicates(file, body.map((row) => toRecord(row, index, resolver)), resolver.states);
  return { file, states: resolver.states, records: unique, repeatedRows: repeated, sha256 };
}

function parseRows(file: string, text: string): RawRow[] {
  return text.includes('"') ? csvParseRows(file, text) : splitPlainCsv(file, text);
}

/** Rows by csv-parse, with the line each record ends on. Exported for the equivalence test. */
export function csvParseRows(file: string, text: string): RawRow[] {
  try {
    const parsed = parse(text, { info: true, trim: true, skip_empty_lines: true, bom: true }) as unknown as
      { record: string[]; info: { lines: number } }[];
    return parsed.map(({ record, info }) => ({ fields: record, line: info.lines }));
  } catch (err) {
    const e = err as { code?: string; lines?: number; message?: string };
    const detail = (e.message ?? 'unreadable').replace(/ on line \d+$| at line \d+$/, '');
    throw new SereError('NOT_CSV', `not a readable CSV table: ${detail}`, { file, line: e.lines },
      'save the survey table as comma-separated values with the same number of fields on every row');
  }
}

/**
 * A table without any quote character is split directly: lines, then commas, fields trimmed, empty
 * lines skipped — exactly what csv-parse does with these options (a property test checks this), but
 * without its per-record info objects. Measured reason: 100,000 survey rows took 430 ms in
 * csv-parse with line info and 40 ms here. Anything quoted goes through csv-parse.
 */
export function splitPlainCsv(file: string, text: string): RawRow[] {
  const lines = text.replace(/^\uFEFF/, '').split('\n');
  const rows: RawRow[] = [];
  let width = -1;
  for (let n = 0; n < lines.length; n++) {
    const line = lines[n]!.endsWith('\r') ? lines[n]!.slice(0, -1) : lines[n]!;
    if (line.trim() === '') continue;
    const fields = line.split(',').map((f) => f.trim());
    if (width === -1) width = fields.length;
    else if (fields.length !== width) {
      throw new SereError('NOT_CSV', `not a readable CSV table: Invalid Record Length: expect ${width}, got ${fields.length}`,
        { file, line: n + 1 }, 'save the survey table as comma-separated values with the same number of fields on every row');
    }
    rows.push({ fields, line: n + 1 });
  }
  return rows;
}

type ColumnIndex = { site: number; time: number; state: number; group?: number };

function columnIndex(file: string, raw: RawRow, columns: SurveyColumns): ColumnIndex {
  const header = { ...raw, fields: raw.fields.map(normaliseLabel) };
  const seen = new Set<string>();
  header.fields.forEach((name, at) => {
    // Which of two 'state' columns holds the states? Refuse rather than guess. Empty names (trailing
    // commas from a spreadsheet) cannot be asked for, so they may repeat.
    if (name !== '' && seen.has(name)) {
      throw new SereError('DUPLICATE_COLUMN', `column ${quote(name)} appears twice in the header (columns ${header.fields.indexOf(name) + 1} and ${at + 1})`,
        { file, line: header.line, column: at + 1 }, 'rename or remove one of the two columns');
    }
    seen.add(name);
  });
  const find = (role: string, wanted: string): number => {
    const name = normaliseLabel(wanted);
    const at = header.fields.indexOf(name);
    if (at < 0) {
      const found = header.fields.map(quote).join(', ');
      // Spreadsheets in many locales save "CSV" with semicolons; the header then arrives as one field.
      const semicolons = header.fields.length === 1 && header.fields[0]!.includes(';');
      throw new SereError('MISSING_COLUMN', `no ${quote(name)} column for the ${role} (header has ${found})`,
        { file, line: header.line },
        semicolons
          ? 'the file uses semicolons; save it with commas between values'
          : `add a ${quote(name)} column, or name the column that holds the ${role} with --${role}-column`);
    }
    return at;
  };
  const index: ColumnIndex = {
    site: find('site', columns.site),
    time: find('time', columns.time),
    state: find('state', columns.state),
  };
  if (columns.group !== undefined) index.group = find('group', columns.group);
  return index;
}

/**
 * Site ids, states and groups in NFC, so one label typed with a precomposed or a combining accent
 * is one label; site ids and groups with invisible characters are refused here (states are checked
 * in states.ts with their look-alikes). Each distinct raw value is normalised and checked once.
 */
function normaliseLabels(file: string, body: readonly RawRow[], index: ColumnIndex): RawRow[] {
  const columns: [string, number | undefined][] = [['site', index.site], ['state', index.state], ['group', index.group]];
  const done = new Map<string, string>();
  const normal = (value: string, role: string, line: number, at: number): string => {
    const key = `${role}\u0000${value}`;
    const known = done.get(key);
    if (known !== undefined) return known;
    const label = normaliseLabel(value);
    const problem = role === 'state' ? undefined : labelProblem(label, `${role} ${quote(label)}`);
    if (problem) throw new SereError(problem.code, problem.what, { file, line, column: at + 1 }, problem.hint);
    done.set(key, label);
    return label;
  };
  return body.map((row) => {
    const fields = [...row.fields];
    for (const [role, at] of columns) {
      if (at !== undefined && fields[at] !== undefined) fields[at] = normal(fields[at]!, role, row.line, at);
    }
    return { fields, line: row.line };
  });
}

function toRecord(row: RawRow, index: ColumnIndex, resolver: StateResolver): SurveyRecord {
  const record: SurveyRecord = {
    site: row.fields[index.site]!,
    time: Number.parseInt(row.fields[index.time]!, 10),
    state: resolver.indexOf(row.fields[index.state]!),
    line: row.line,
  };
  return index.group === undefined ? record : { ...record, group: row.fields[index.group]! };
}

/**
 * A site surveyed twice at the same time must agree with itself: two different states are an
 * error naming both lines; an exact repeat is counted, reported and used once.
 */
function withoutDuplicates(file: string, records: readonly SurveyRecord[], states: readonly string[]): { unique: SurveyRecord[]; repeated: number } {
  const seen = new Map<string, SurveyRecord>();
  const unique: SurveyRecord[] = [];
  for (const r of records) {
    // A NUL cannot occur in a text file (they are rejected on reading), so it separates safely.
    const key = `${r.site}\u0000${r.time}`;
    const first = seen.get(key);
    if (first === undefined) {
      seen.set(key, r);
      unique.push(r);
    } else if (first.state !== r.state) {
      throw new SereError('DUPLICATE_SURVEY',
        `site ${quote(r.site)} at time ${r.time} is ${quote(states[r.state]!)} here but ${quote(states[first.state]!)} on line ${first.line}`,
        { file, line: r.line }, 'keep one of the two rows');
    }
  }
  return { unique, repeated: records.length - unique.length };
}
