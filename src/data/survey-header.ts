import { SereError, quote } from '../errors.js';
import { normaliseLabel } from './labels.js';
import { isCountsHeader } from './counts-table.js';
import type { SurveyColumns } from './survey.js';
import { settingName } from '../setting-name.js';

/** The observer column used when none is named, with an error matrix (observer error). */
export const DEFAULT_OBSERVER_COLUMN = 'observer';

/** Which field of a row holds what. */
export type ColumnIndex = { site: number; time: number; state: number; group?: number; observer?: number; x?: number; y?: number };

/** A column's role, as messages and flags name it (`--x-column`). */
export type ColumnRole = 'site' | 'time' | 'state' | 'group' | 'observer' | 'x' | 'y';

/** The columns named in a header row (fields as read), or the error that says which is missing or repeated. */
export function columnIndex(file: string, fields: readonly string[], line: number, columns: SurveyColumns, detectObserver = false): ColumnIndex {
  const header = headerNames(file, fields, line);
  const find = (role: ColumnRole, wanted: string): number => findColumn(file, header, line, role, wanted);
  const index: ColumnIndex = {
    site: find('site', columns.site),
    time: find('time', columns.time),
    state: find('state', columns.state),
  };
  if (columns.group !== undefined) index.group = find('group', columns.group);
  if (columns.observer !== undefined) index.observer = find('observer', columns.observer);
  // With an error matrix and no observer column named, a column named `observer` is the observer's.
  else if (detectObserver && header.includes(DEFAULT_OBSERVER_COLUMN)) index.observer = header.indexOf(DEFAULT_OBSERVER_COLUMN);
  if (columns.x !== undefined) index.x = find('x', columns.x);
  if (columns.y !== undefined) index.y = find('y', columns.y);
  return index;
}

/** The header's names, normalised; a name given twice is an error. */
export function headerNames(file: string, fields: readonly string[], line: number): string[] {
  const header = fields.map(normaliseLabel);
  const seen = new Set<string>();
  header.forEach((name, at) => {
    // Which of two 'state' columns holds the states? Refuse rather than guess. Empty names (trailing
    // commas from a spreadsheet) cannot be asked for, so they may repeat.
    if (name !== '' && seen.has(name)) {
      throw new SereError('DUPLICATE_COLUMN', `column ${quote(name)} appears twice in the header (columns ${header.indexOf(name) + 1} and ${at + 1})`,
        { file, line, column: at + 1 }, 'rename or remove one of the two columns');
    }
    seen.add(name);
  });
  return header;
}

/** What a MISSING_COLUMN error says first: one wording, so a scenario can tell which of its settings it concerns. */
export function missingColumn(name: string, role: string): string {
  return `no ${quote(name)} column for the ${role}`;
}

/** The place of the column named `wanted` in a normalised header, or the MISSING_COLUMN error. */
export function findColumn(file: string, header: readonly string[], line: number, role: ColumnRole, wanted: string): number {
  const name = normaliseLabel(wanted);
  const at = header.indexOf(name);
  if (at < 0) {
    if (isCountsHeader(header)) {
      throw new SereError('NO_SITE_COUNTS', 'this is a counts table (sere count), and this needs the survey table itself (one row per site and survey)',
        { file, line }, 'give the survey table; a counts table serves sere fit, forecast, compare and check');
    }
    const found = header.map(quote).join(', ');
    // Spreadsheets in many locales save "CSV" with semicolons; the header then arrives as one field.
    const semicolons = header.length === 1 && header[0]!.includes(';');
    throw new SereError('MISSING_COLUMN', `${missingColumn(name, role)} (header has ${found})`,
      { file, line },
      semicolons
        ? 'the file uses semicolons; save it with commas between values'
        : `add a ${quote(name)} column, or name the column that holds the ${role} with ${settingName(`--${role}-column`, `fit.columns.${role}`)}`);
  }
  return at;
}
