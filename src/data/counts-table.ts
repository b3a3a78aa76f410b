import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { compareCodePoints } from './code-points.js';

/**
 * A counts table: the sufficient statistics of a survey table, as `sere count` writes them and
 * `sere fit` reads them (README, "Counts table"). Column names avoid SQL reserved words (group,
 * from, to, time) so the same table comes out of `sere count --sql` on any engine unquoted.
 *
 * Every survey of the table is the `to` end of exactly one row: a site's first survey is a row
 * with no `from_state` (and no gap), each later survey the end of a pair from the survey before it.
 * So the rows carry, besides the transitions by gap, the mix surveyed at every time (the latest of
 * them starts a forecast), the number of surveys, and — summing the first-survey rows — the number
 * of sites.
 *
 * And every site's last survey is the `from` end of one *last-survey row*: no `to_state` and no gap,
 * `to_time` the time of that last survey, `n` the sites whose last survey it was (pooled, never per
 * site). A forecast starts sites not surveyed at the latest time from them, carried forward
 * (chain/latest-mix.ts). Counts tables written before these rows existed read as before: their
 * forecasts then start from the sites surveyed at the latest time only.
 */
export const COUNTS_COLUMNS = ['site_group', 'site', 'from_state', 'to_state', 'gap', 'to_time', 'step', 'n'] as const;
/** The columns every counts table has; site_group and site are there only when counted by group, or per site. */
export const REQUIRED_COUNTS_COLUMNS = ['from_state', 'to_state', 'gap', 'to_time', 'step', 'n'] as const;

/** `from` of a site's first survey: there is no survey before it. */
export const FIRST_SURVEY = -1;
/** `to` of a site's last survey: there is no survey after it (the row's `from` and `time` are that survey's). */
export const LAST_SURVEY = -1;

/**
 * Pooled over sites: `n` surveys of state `to` at `time`, each `gap` steps after a survey in state
 * `from`; or (`to` = LAST_SURVEY, gap 0) `n` sites last surveyed at `time`, in state `from`.
 */
export interface CountCell {
  readonly group?: string;
  /** Index into `states`, or FIRST_SURVEY. */
  readonly from: number;
  /** Index into `states`, or LAST_SURVEY. */
  readonly to: number;
  /** Steps between the two surveys (Δt / step; not always whole); 0 for a first survey. */
  readonly gap: number;
  /** The survey time of the `to` survey. */
  readonly time: number;
  readonly n: number;
  /** Line in the counts file (0 when counted now): for messages. */
  readonly line: number;
}

/** One site's counts over all times (what the site bootstrap resamples): `time` is not kept. */
export interface SiteCell {
  readonly site: string;
  readonly group?: string;
  readonly from: number;
  readonly to: number;
  readonly gap: number;
  readonly n: number;
  readonly line: number;
}

export interface CountsTable {
  /** Where the counts came from (the counts file, or the survey tables counted). */
  readonly file: string;
  readonly sha256: string;
  readonly states: readonly string[];
  /** Time units one step spans: gaps are in steps. */
  readonly step: number;
  readonly grouped: boolean;
  readonly cells: readonly CountCell[];
  /** Per-site counts, when asked for (`sere count --per-site`). */
  readonly siteCells?: readonly SiteCell[];
  /** Rows of the survey tables that repeated an earlier (site, time, state) exactly: used once. */
  readonly repeatedRows: number;
}

/**
 * Whether a header row (already split) is a counts table's: it has `from_state` and `to_state`,
 * which no survey table needs. Its other columns are then checked by the counts reader, so a counts
 * table missing one (say `step`) is told so, not asked for a `site` column.
 */
export function isCountsHeader(fields: readonly string[]): boolean {
  const names = new Set(fields.map((f) => f.trim().replace(/^"(.*)"$/, '$1')));
  return names.has('from_state') && names.has('to_state');
}

/**
 * Whether a file is a counts table, by its header: the first line (of at most 64 KiB), split at
 * commas. A file that cannot be read is not one (its reader then says why).
 */
export function isCountsFile(file: string): boolean {
  let fd: number | undefined;
  try {
    // A pipe or device is not a counts table (and opening a FIFO would wait for a writer).
    if (!statSync(file).isFile()) return false;
    fd = openSync(file, 'r');
    const buffer = Buffer.alloc(65536);
    const bytes = readSync(fd, buffer, 0, buffer.length, 0);
    const text = buffer.subarray(0, bytes).toString('utf8').replace(/^\uFEFF/, '');
    const end = text.search(/\r?\n/);
    return isCountsHeader((end < 0 ? text : text.slice(0, end)).split(','));
  } catch {
    return false;
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/**
 * The order a counts table is written in: group (code points), then first surveys, pairs and last
 * surveys, each by from, to, gap, time.
 */
export function sortCells<C extends CountCell>(cells: C[]): C[] {
  return cells.sort((x, y) => compareCodePoints(x.group ?? '', y.group ?? '') || rowKind(x) - rowKind(y) || x.from - y.from || x.to - y.to || x.gap - y.gap || x.time - y.time);
}

/** Whether a cell is a last-survey row (see LAST_SURVEY). */
export function isLastSurvey(cell: Pick<CountCell, 'from' | 'to'>): boolean {
  return cell.to === LAST_SURVEY && cell.from !== FIRST_SURVEY;
}

function rowKind(cell: CountCell): number {
  return cell.from === FIRST_SURVEY ? 0 : isLastSurvey(cell) ? 2 : 1;
}

/** Per-site rows in site order (code points, the site bootstrap's order), then from, to, gap. */
export function sortSiteCells<C extends SiteCell>(cells: C[]): C[] {
  return cells.sort((x, y) => compareCodePoints(x.site, y.site) || x.from - y.from || x.to - y.to || x.gap - y.gap);
}
