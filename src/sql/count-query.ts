import { SereError, quote } from '../errors.js';
import type { SurveyColumns } from '../data/survey.js';

export interface CountingSqlOptions {
  /** The table (or view) holding one row per site and survey; `schema.table` allowed. */
  readonly table: string;
  readonly columns: SurveyColumns;
  readonly step: number;
  /** Also each site's counts over all times (rows with a site and no time). */
  readonly perSite: boolean;
}

/**
 * Words reserved in standard SQL or in one of the engines the query is for (Spark SQL, Trino,
 * DuckDB, SQLite) that a survey column might be called: unquoted they would not parse, and the
 * engines quote identifiers differently ("…" in Trino and SQLite, `…` in Spark), so the query
 * quotes nothing and such names are refused with the fix.
 */
const RESERVED = new Set(['all', 'and', 'as', 'between', 'by', 'case', 'cast', 'cross', 'current_date', 'current_time',
  'current_timestamp', 'date', 'desc', 'distinct', 'else', 'end', 'except', 'exists', 'false', 'from', 'full', 'group',
  'having', 'in', 'inner', 'intersect', 'interval', 'is', 'join', 'left', 'like', 'limit', 'not', 'null', 'on', 'or',
  'order', 'outer', 'over', 'partition', 'right', 'select', 'table', 'then', 'to', 'true', 'union', 'user', 'using',
  'values', 'when', 'where', 'window', 'with']);

function identifier(name: string, flag: string, dotted = false): string {
  const part = /^[A-Za-z_][A-Za-z0-9_]*$/;
  const parts = dotted ? name.split('.') : [name];
  const bad = parts.find((p) => !part.test(p) || RESERVED.has(p.toLowerCase()));
  if (bad !== undefined) {
    throw new SereError('BAD_SQL_NAME', `${quote(name)} cannot be written unquoted in portable SQL${RESERVED.has(bad.toLowerCase()) ? ` (${quote(bad)} is a reserved word)` : ''}`,
      { path: flag }, 'use letters, digits and _ only (not starting with a digit, no reserved word): rename the column, or make a view that does');
  }
  return name;
}

/**
 * The counting query, in SQL that runs unchanged on Spark SQL, Trino, DuckDB and SQLite (≥ 3.25):
 * only a CTE, the standard window functions LAG, LEAD and FIRST_VALUE … OVER (PARTITION BY … ORDER BY …), GROUP BY,
 * UNION ALL and CAST(… AS DOUBLE); no quoting, no engine functions. Its result is a
 * counts table (data/counts-table.ts) — rows in no particular order, which `sere fit` does not
 * need. The DuckDB engine runs this same text over its view of the files (sql/duckdb-count.ts).
 *
 * Two rows of one site at one time come out as a pair with gap 0: in the same state, an exact
 * repeat, which the counts reader drops (and counts, as the survey reader does); in two states, a
 * contradiction, which it refuses. Whatever order the engine puts tied rows in, dropping the
 * repeat leaves the site's other pairs as they would be without it. No SELECT DISTINCT, then:
 * measured on 10⁷ Parquet rows in DuckDB, it doubled the query's time (11.0 s against 4.6 s).
 *
 * A site's last survey (no LEAD time) is also counted, pooled by state and time: the last-survey
 * rows (data/counts-table.ts). Of tied last rows exactly one has no LEAD, and which one does not
 * matter: an exact repeat has the same state, and a contradiction is refused.
 */
export function countingSql(options: CountingSqlOptions): string {
  const { columns, step } = options;
  if (!Number.isSafeInteger(step) || step < 1) throw new Error('internal: step must be a positive whole number');
  const table = identifier(options.table, '--table', true);
  // The query's own names (its CTEs) would shadow a table of the same name.
  if (['sere_once', 'sere_pairs'].includes(table.toLowerCase())) {
    throw new SereError('BAD_SQL_NAME', `${quote(table)} is a name the counting query uses itself`, { path: '--table' }, 'make a view with another name');
  }
  const site = identifier(columns.site, '--site-column');
  const time = identifier(columns.time, '--time-column');
  const state = identifier(columns.state, '--state-column');
  const group = columns.group === undefined ? undefined : identifier(columns.group, '--group-column');
  const g = group === undefined ? '' : 'site_group, ';
  const pooled = [
    `SELECT ${g}${options.perSite ? 'NULL AS site, ' : ''}from_state, state AS to_state, CAST(dt AS DOUBLE) / ${step} AS gap, survey_time AS to_time, ${step} AS step, COUNT(*) AS n`,
    'FROM sere_pairs',
    `GROUP BY ${g}from_state, state, dt, survey_time`,
  ];
  const last = [
    'UNION ALL',
    `SELECT ${g}${options.perSite ? 'NULL AS site, ' : ''}state AS from_state, NULL AS to_state, NULL AS gap, survey_time AS to_time, ${step} AS step, COUNT(*) AS n`,
    'FROM sere_pairs',
    'WHERE next_time IS NULL',
    `GROUP BY ${g}state, survey_time`,
  ];
  const perSite = options.perSite ? [
    'UNION ALL',
    `SELECT ${g}site, from_state, state AS to_state, CAST(dt AS DOUBLE) / ${step} AS gap, NULL AS to_time, ${step} AS step, COUNT(*) AS n`,
    'FROM sere_pairs',
    `GROUP BY ${g}site, from_state, state, dt`,
  ] : [];
  return [
    `-- sere count: the counts table of ${table} (site ${site}, time ${time}, state ${state}${group ? `, group ${group}` : ''}), steps of ${step}.`,
    '-- Save the result as CSV with a header and fit it with: sere fit counts.csv',
    'WITH sere_once AS (',
    `  SELECT ${site} AS site, ${time} AS survey_time, ${state} AS state${group ? `, ${group} AS site_group` : ''}`,
    `  FROM ${table}`,
    '),',
    'sere_pairs AS (',
    // A site's group is the one of its first survey, as the survey reader keeps it (one group per site).
    `  SELECT ${group ? 'FIRST_VALUE(site_group) OVER (PARTITION BY site ORDER BY survey_time) AS site_group, ' : ''}site, state, survey_time,`,
    '    LAG(state) OVER (PARTITION BY site ORDER BY survey_time) AS from_state,',
    '    survey_time - LAG(survey_time) OVER (PARTITION BY site ORDER BY survey_time) AS dt,',
    '    LEAD(survey_time) OVER (PARTITION BY site ORDER BY survey_time) AS next_time',
    '  FROM sere_once',
    ')',
    ...pooled,
    ...last,
    ...perSite,
  ].join('\n') + '\n';
}
