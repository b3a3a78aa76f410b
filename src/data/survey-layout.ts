import { SereError, quote } from '../errors.js';
import { normaliseLabel } from './labels.js';
import { parseTime, TIME_OK } from './parse-time.js';
import { columnIndex, findColumn, headerNames, type ColumnIndex } from './survey-header.js';
import type { SurveyColumns, SurveyLayout } from './survey.js';
import { settingName } from '../setting-name.js';

/**
 * The columns of a wide table: the site (and group) column, and for every other column the survey
 * time its header names. Columns with an empty header (trailing commas) hold no surveys: `times`
 * is NaN there and any value under them is an error.
 */
export interface WideIndex {
  readonly site: number;
  readonly group?: number;
  readonly x?: number;
  readonly y?: number;
  /** Survey time of each column; NaN for the site, group and empty-headed columns. */
  readonly times: Float64Array;
}

export type HeaderIndex =
  | { readonly layout: 'long'; readonly index: ColumnIndex }
  | { readonly layout: 'wide'; readonly index: WideIndex };

/**
 * Read a header row as the given layout, or detect it: a header with the time and state columns is
 * long; one with the site column and otherwise only survey times (besides the group column, and
 * empty names) is wide; anything else is read as long, so its error names the missing column —
 * with a hint to pass --wide when the header looks like a wide table's with one stray column.
 */
export function headerIndex(file: string, fields: readonly string[], line: number, columns: SurveyColumns, layout?: SurveyLayout, detectObserver = false): HeaderIndex {
  const header = headerNames(file, fields, line);
  const chosen = layout ?? detectLayout(header, columns);
  if (chosen === 'wide') {
    if (columns.observer !== undefined) {
      // A wide row is one site over several times: it cannot say who made each survey.
      throw new SereError('BAD_OPTION', 'an observer column needs a long table (one row per site and survey), and this one is wide',
        { file, line }, 'write the table long, with site, time, state and observer columns');
    }
    return { layout: 'wide', index: wideIndex(file, header, line, columns) };
  }
  try {
    return { layout: 'long', index: columnIndex(file, fields, line, columns, detectObserver) };
  } catch (err) {
    if (err instanceof SereError && err.code === 'MISSING_COLUMN' && layout === undefined && looksWide(header, columns)) {
      throw new SereError(err.code, err.message, err.place,
        `for a wide table (one row per site, one column per survey time) pass ${settingName('--wide', 'fit.layout: wide')}; name any column that is not a time with ${settingName('--group-column', 'fit.columns.group')}, or remove it`);
    }
    throw err;
  }
}

/** The survey time a header names, or undefined: a whole number, as a long table's time column holds. */
export function headerTime(name: string): number | undefined {
  const bytes = Buffer.from(name);
  const parsed = parseTime(bytes, 0, bytes.length, true);
  return parsed.status === TIME_OK ? parsed.value : undefined;
}

function detectLayout(header: readonly string[], columns: SurveyColumns): SurveyLayout {
  const has = (name: string): boolean => header.includes(normaliseLabel(name));
  if (has(columns.time) && has(columns.state)) return 'long';
  if (!has(columns.site)) return 'long';
  const others = otherColumns(header, columns);
  return others.length > 0 && others.every((name) => headerTime(name) !== undefined) ? 'wide' : 'long';
}

/** The site column and at least one survey time among the others. */
function looksWide(header: readonly string[], columns: SurveyColumns): boolean {
  return header.includes(normaliseLabel(columns.site)) && otherColumns(header, columns).some((name) => headerTime(name) !== undefined);
}

/** Header names other than the site, group and position columns and empty ones. */
function otherColumns(header: readonly string[], columns: SurveyColumns): string[] {
  const named = new Set([columns.site, columns.group, columns.observer, columns.x, columns.y].filter((c) => c !== undefined).map(normaliseLabel));
  return header.filter((name) => name !== '' && !named.has(name));
}

function wideIndex(file: string, header: readonly string[], line: number, columns: SurveyColumns): WideIndex {
  const site = findColumn(file, header, line, 'site', columns.site);
  const group = columns.group === undefined ? undefined : findColumn(file, header, line, 'group', columns.group);
  const x = columns.x === undefined ? undefined : findColumn(file, header, line, 'x', columns.x);
  const y = columns.y === undefined ? undefined : findColumn(file, header, line, 'y', columns.y);
  const times = new Float64Array(header.length).fill(Number.NaN);
  const columnOfTime = new Map<number, number>();
  header.forEach((name, at) => {
    if (at === site || at === group || at === x || at === y || name === '') return;
    const time = headerTime(name);
    if (time === undefined) {
      throw new SereError('BAD_TIME', `column ${at + 1} (${quote(name)}) is not a survey time: in a wide table every column besides the site${columns.group === undefined ? '' : ' and group'} column is headed by a whole-number time`,
        { file, line, column: at + 1 }, `remove the column, head it with the survey time (e.g. 2024), or name it with ${settingName('--group-column', 'fit.columns.group')}`);
    }
    const earlier = columnOfTime.get(time);
    if (earlier !== undefined) {
      throw new SereError('DUPLICATE_COLUMN', `survey time ${time} heads two columns (columns ${earlier + 1} and ${at + 1})`,
        { file, line, column: at + 1 }, 'merge the two columns into one, or correct the time');
    }
    columnOfTime.set(time, at);
    times[at] = time;
  });
  if (columnOfTime.size === 0) {
    throw new SereError('MISSING_COLUMN', `a wide table needs one column per survey time besides the ${quote(normaliseLabel(columns.site))} column (header has ${header.map(quote).join(', ')})`,
      { file, line }, 'add a column for each survey time, headed by the time (e.g. 2024)');
  }
  return { site, ...(group === undefined ? {} : { group }), ...(x === undefined ? {} : { x }), ...(y === undefined ? {} : { y }), times };
}
