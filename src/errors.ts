/**
 * Errors for bad input carry a code and a place; only the CLI turns them into one line of prose.
 *
 * Every stage throws `SereError` for input it cannot accept. Tests assert `code`, never the wording
 * (after the yaml library's errors with code and position).
 */

export type ErrorCode =
  | 'FILE_NOT_FOUND'
  | 'FILE_NOT_TEXT'
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
  | 'NO_TRANSITIONS'
  | 'TOO_FEW_STATES'
  | 'IMPOSSIBLE_OBSERVED'
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
  | 'BUSY';

/** Where in the user's input the problem is; every part optional, most specific first. */
export interface Place {
  readonly file?: string;
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

/** `file:line:column` (or as much of it as is known), then the key path. */
export function formatPlace(place: Place): string {
  let where = place.file ?? '';
  if (place.line !== undefined) where += `:${place.line}`;
  if (place.line !== undefined && place.column !== undefined) where += `:${place.column}`;
  if (place.path) where += where ? ` (${place.path})` : place.path;
  return where;
}

/** The one-line message the CLI prints for a SereError. */
export function formatError(error: SereError): string {
  const where = formatPlace(error.place);
  const fix = error.hint ? ` — ${error.hint}` : '';
  return `${where ? `${where}: ` : ''}${error.message}${fix}`;
}
