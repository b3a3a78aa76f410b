import { stringify } from 'csv-stringify/sync';
import { FIRST_SURVEY, isLastSurvey, type CountsTable } from './counts-table.js';
import { TOOL_VERSION } from '../version.js';

/**
 * A counts table as CSV — the writer beside its reader (read-counts-csv.ts), one owner of the format (README, "Counts table"): pooled rows (site empty), then, when counted per
 * site, each site's rows over all times (to_time empty). site_group and site are written only when
 * the table has them. Gaps are in steps, exactly as JavaScript prints Δt / step.
 */
export function countsCsv(table: CountsTable): string {
  const perSite = table.siteCells !== undefined;
  const header = [...(table.grouped ? ['site_group'] : []), ...(perSite ? ['site'] : []), 'from_state', 'to_state', 'gap', 'to_time', 'step', 'n'];
  // FIRST_SURVEY and LAST_SURVEY (both -1) are written as an empty state.
  const label = (i: number): string => (i === FIRST_SURVEY ? '' : table.states[i]!);
  const gap = (from: number, to: number, g: number): string => (from === FIRST_SURVEY || isLastSurvey({ from, to }) ? '' : String(g));
  const rows: (string | number)[][] = [header];
  for (const c of table.cells) {
    rows.push([...(table.grouped ? [c.group!] : []), ...(perSite ? [''] : []), label(c.from), label(c.to), gap(c.from, c.to, c.gap), c.time, table.step, c.n]);
  }
  for (const c of table.siteCells ?? []) {
    rows.push([...(table.grouped ? [c.group!] : []), c.site, label(c.from), label(c.to), gap(c.from, c.to, c.gap), '', table.step, c.n]);
  }
  return stringify(rows);
}

export interface CountsInput {
  readonly file: string;
  readonly sha256: string;
  /** A survey table counted now, or a counts table (a shard) added in. */
  readonly kind: 'survey table' | 'counts table';
}

/**
 * The sidecar `sere count` writes next to the counts CSV: each input's SHA-256, the counts file's
 * own SHA-256 and the totals the shards added up to. A separate file, not comment lines, so the
 * CSV stays a plain table that any engine (and `sere count --sql`'s output) reads without options.
 */
export function countsSources(table: CountsTable, csvFile: string, csvSha256: string, inputs: readonly CountsInput[], engine: string): object {
  let sites = 0;
  let surveys = 0;
  let transitions = 0;
  let otherPairs = 0;
  let lastSurveys = 0;
  for (const c of table.cells) {
    if (isLastSurvey(c)) {
      lastSurveys += c.n;
      continue;
    }
    surveys += c.n;
    if (c.from === FIRST_SURVEY) sites += c.n;
    else if (c.gap === 1) transitions += c.n;
    else otherPairs += c.n;
  }
  return {
    format: 'sere-counts-sources',
    format_version: 1,
    tool_version: TOOL_VERSION,
    counts: { file: csvFile, sha256: csvSha256 },
    inputs: inputs.map((i) => ({ file: i.file, kind: i.kind, sha256: i.sha256 })),
    engine,
    step: table.step,
    states: table.states,
    per_site: table.siteCells !== undefined,
    totals: { sites, surveys, transitions, other_pairs: otherPairs, repeated_rows: table.repeatedRows, sites_by_last_survey: lastSurveys },
  };
}
