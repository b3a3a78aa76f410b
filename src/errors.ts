/**
 * Errors for bad input carry a code and a place; only the CLI turns them into one line of prose.
 *
 * Every stage throws `SereError` for input it cannot accept. Tests assert `code`, never the wording
 * (after the yaml library's errors with code and position).
 */

export type ErrorCode =
  | 'FILE_NOT_FOUND'
  | 'FILE_NOT_TEXT'
  | 'NOT_A_FILE'
  | 'NOT_UTF8'
  | 'FILE_EXISTS'
  | 'CANNOT_WRITE'
  | 'EMPTY_FILE'
  | 'NOT_CSV'
  | 'MISSING_COLUMN'
  | 'EMPTY_VALUE'
  | 'BAD_TIME'
  | 'DUPLICATE_SURVEY'
  | 'UNKNOWN_STATE'
  | 'STATE_CASE_CLASH'
  | 'STATE_LOOK_ALIKE'
  | 'OBSERVER_LOOK_ALIKE'
  | 'INVISIBLE_CHARACTER'
  | 'LABEL_TOO_LONG'
  | 'TOO_MANY_STATES'
  | 'DUPLICATE_COLUMN'
  | 'DUPLICATE_SITE'
  | 'BAD_COORDINATE'
  | 'SITE_MOVED'
  | 'UNMAPPED_LABEL'
  | 'DUPLICATE_KEY'
  | 'BAD_LABEL_MAP'
  | 'UNKNOWN_SHEET'
  | 'BAD_SPREADSHEET'
  | 'BAD_CELL'
  | 'NO_TRANSITIONS'
  | 'TOO_FEW_STATES'
  | 'IMPOSSIBLE_OBSERVED'
  | 'GAP_NOT_WHOLE_STEPS'
  | 'ROW_ALL_IMPOSSIBLE'
  | 'BAD_PRIOR'
  | 'BAD_OPTION'
  | 'BAD_FIT_FILE'
  | 'BAD_RECORD'
  | 'REPLAY_DIFFERS'
  | 'BAD_YAML'
  | 'BAD_SCENARIO'
  | 'BAD_SHARES'
  | 'BAD_MATRIX'
  | 'TOO_LARGE'
  | 'BAD_WORKSPACE'
  | 'BUSY'
  | 'BAD_RASTER'
  | 'GRID_MISMATCH'
  | 'NO_SITE_COUNTS'
  | 'BAD_COUNTS'
  | 'SITE_IN_TWO_SHARDS'
  | 'BAD_SQL_NAME'
  | 'BAD_ERROR_MATRIX'
  | 'STATE_NEVER_VERIFIED'
  | 'IMPOSSIBLE_RECORD'
  | 'WORKER_DIED'
  | 'BAD_ZONES';

/** Where in the user's input the problem is; every part optional, most specific first. */
export interface Place {
  readonly file?: string;
  /** The worksheet of a spreadsheet: `line` is then its row and `column` its column (shown as A1). */
  readonly sheet?: string;
  readonly line?: number;
  readonly column?: number;
  /** Key path inside a YAML or JSON document, e.g. `start.shares.reedbed`. */
  readonly path?: string;
}

export class SereError extends Error {
  readonly code: ErrorCode;
  readonly place: Place;
  /** How to fix it, in the imperative ("add a 'state' column"). */
  readonly hint: string;

  constructor(code: ErrorCode, what: string, place: Place = {}, hint = '') {
    super(what);
    this.name = 'SereError';
    this.code = code;
    this.place = place;
    this.hint = hint;
  }
}

/** Longest echoed value, in characters: longer ones show their start and '…'. */
export const MAX_QUOTED_LENGTH = 60;
/** Backstop for one part of a message (what, place, hint) however it was built. */
const MAX_PART_LENGTH = 1000;

/**
 * Control, format and line-separator characters (Unicode Cc, Cf, Zl, Zp) shown as escapes:
 * a newline or ESC in a label must not break the one-line message or drive the terminal, and a
 * zero-width or bidi character must be seen, not silently reorder or hide text.
 */
const UNPRINTABLE = /[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/gu;
const NAMED_ESCAPES = new Map([['\n', '\\n'], ['\r', '\\r'], ['\t', '\\t']]);

export function escapeUnprintable(text: string): string {
  return text.replace(UNPRINTABLE, (c) =>
    NAMED_ESCAPES.get(c) ?? codePointEscape(c.codePointAt(0)!));
}

/** `\u001b`, or `\u{e0001}` beyond the Basic Multilingual Plane, as in JavaScript source. */
function codePointEscape(code: number): string {
  return code > 0xffff ? `\\u{${code.toString(16)}}` : `\\u${code.toString(16).padStart(4, '0')}`;
}

/** `text` if at most `max` code points, else its first `max − 3` and '…' (never half a surrogate pair). */
function cut(text: string, max: number): string {
  if (text.length <= max) return text;
  const points: string[] = [];
  // Walk code points only as far as needed: a 10 MB value costs no more than a short one.
  for (const c of text) {
    points.push(c);
    if (points.length > max) return `${points.slice(0, max - 3).join('')}…`;
  }
  return text;
}

/**
 * A piece of user input (a label, a site id, a value) as a message shows it: quoted, escaped and
 * cut to MAX_QUOTED_LENGTH, so a 10 MB label or one holding a newline stays one readable line.
 */
export function quote(value: string): string {
  return `'${escapeUnprintable(cut(value, MAX_QUOTED_LENGTH))}'`;
}

/** One part of the printed line: escaped, and cut if something long slipped through unquoted. */
const printable = (text: string): string => escapeUnprintable(cut(text, MAX_PART_LENGTH));

/** `file:line:column` (or as much of it as is known), then the key path; in a spreadsheet `file, sheet 'S', cell B7`. */
export function formatPlace(place: Place): string {
  let where = place.file ?? '';
  if (place.sheet !== undefined) {
    where += `, sheet ${quote(place.sheet)}`;
    if (place.line !== undefined) where += place.column !== undefined ? `, cell ${columnLetters(place.column)}${place.line}` : `, row ${place.line}`;
  } else {
    if (place.line !== undefined) where += `:${place.line}`;
    if (place.line !== undefined && place.column !== undefined) where += `:${place.column}`;
  }
  if (place.path) where += where ? ` (${place.path})` : place.path;
  return where;
}

/** The one-line message the CLI prints for a SereError: always one line, never unbounded. */
export function formatError(error: SereError): string {
  const where = printable(formatPlace(error.place));
  const fix = error.hint ? ` — ${printable(error.hint)}` : '';
  return `${where ? `${where}: ` : ''}${printable(error.message)}${fix}`;
}

/** A spreadsheet column's letters from its 1-based number: 1 → A, 27 → AA (bijective base 26). */
export function columnLetters(column: number): string {
  let out = '';
  for (let n = column; n > 0; n = Math.floor((n - 1) / 26)) out = String.fromCharCode(65 + ((n - 1) % 26)) + out;
  return out;
}
