import type { SeasonRounding } from './seasons.js';
/**
 * The surveys of a table, one column per field in typed arrays — not one object per row: 10⁷ rows
 * as objects took 4.8 GB and most of the time in the garbage collector; as columns they take 21
 * bytes a row (25 with a group column).
 *
 * Rows are unique by (site, time) and ordered by site (`SurveyTable.sites` order, code-point order
 * of the ids), then time: the order counting needs, so a fit is one pass. Row n is site
 * `sites[site[n]]`, surveyed at `time[n]` in state `states[state[n]]`, from CSV line `line[n]`.
 */
export interface SurveyRows {
  readonly count: number;
  readonly site: Int32Array;
  /** Whole numbers within ±(2⁵³ − 1), exact in a double. */
  readonly time: Float64Array;
  /** Index into the table's `states` (at most 100 states: one byte). */
  readonly state: Uint8Array;
  /** Line numbers as doubles: exact however long the file is. */
  readonly line: Float64Array;
  /** Index into the table's `groups`, when the table has a group column. */
  readonly group?: Int32Array;
  /** Index into the table's `observers`, when the table has an observer column (observer error). */
  readonly observer?: Int32Array;
}

/** One survey record, for tables built in memory (simulations, tests): see survey-rows.ts. */
export interface SurveyRecord {
  readonly site: string;
  readonly time: number;
  /** Index into the survey table's `states`. */
  readonly state: number;
  readonly group?: string;
  /** Who made the survey (observer error with one error matrix per observer). */
  readonly observer?: string;
  readonly line: number;
  /** The site's position (projected units), when the table has x and y columns. */
  readonly x?: number;
  readonly y?: number;
}

/** A validated survey table: states in their final order, rows by site then time. */
export interface SurveyTable {
  readonly file: string;
  readonly states: readonly string[];
  /** Distinct site ids in code-point order (a site may have no rows left in a selection). */
  readonly sites: readonly string[];
  /** Distinct values of the group column (indexed by `rows.group`), when there is one. */
  readonly groups?: readonly string[];
  /** Distinct values of the observer column (indexed by `rows.observer`), when there is one. */
  readonly observers?: readonly string[];
  /** The observer column's name as the header has it, and its column (1-based), for messages. */
  readonly observerColumn?: { readonly name: string; readonly column?: number };
  readonly rows: SurveyRows;
  /** Rows that repeated an earlier (site, time, state) exactly; counted, used once. */
  readonly repeatedRows: number;
  /** SHA-256 of the file's bytes, so a record can prove which data it came from. */
  readonly sha256: string;
  /** The label map the labels went through, and how many surveys it left out (labels mapped to skip). */
  readonly labels?: LabelMapUse;
  /** When the time column held dates: how they were rounded to season years (the times in `rows`). */
  readonly seasons?: SeasonRounding;
  /** With x and y columns: site s at (`positions[2s]`, `positions[2s + 1]`), in projected units, aligned with `sites`. */
  readonly positions?: Float64Array;
}

export interface LabelMapUse {
  readonly file: string;
  readonly sha256: string;
  readonly droppedRows: number;
}

/**
 * How a table holds its surveys: `long`, one row per site and survey (site, time, state columns);
 * `wide`, one row per site and one column per survey time, headed by the time, an empty cell for
 * a time the site was not surveyed. Undefined: detected from the header (survey-layout.ts).
 */
export type SurveyLayout = 'long' | 'wide';

/** Which CSV columns hold what. */
export interface SurveyColumns {
  readonly site: string;
  readonly time: string;
  readonly state: string;
  readonly group?: string;
  /**
   * The column naming who made each survey, for one error matrix per observer (observer error);
   * long tables only.
   */
  readonly observer?: string;
  /**
   * Columns holding each site's position in projected units (easting, northing), for the spatial
   * block bootstrap; both or neither. Absent: sites have no positions and nothing changes.
   */
  readonly x?: string;
  readonly y?: string;
}

export const DEFAULT_COLUMNS: SurveyColumns = { site: 'site', time: 'time', state: 'state' };
