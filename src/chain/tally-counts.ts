import { FIRST_SURVEY, LAST_SURVEY, sortCells, sortSiteCells, type CountCell, type CountsTable, type SiteCell } from '../data/counts-table.js';
import type { SurveyTable } from '../data/survey.js';

export interface TallyOptions {
  readonly step: number;
  /** Also keep each site's counts (the site bootstrap needs them). */
  readonly perSite: boolean;
}

/**
 * The counts table of a survey table: every survey is the `to` end of one row — a site's first
 * survey (no `from`), or the end of a pair from the site's survey before it, pooled over sites by
 * (group, from, to, gap, time). These are the sufficient statistics of a chain observed at
 * irregular times on independent sites (Anderson & Goodman 1957; Kalbfleisch & Lawless 1985 for
 * pairs several steps apart), plus the surveyed mix at every time, and the sites by the state and
 * time of their last survey (the rows that carry unsurveyed sites into a forecast's start).
 *
 * One pass over the rows (ordered by site, then time). Pooled counts live in one dense
 * (k + 1) × k table per (time, Δt, group) — a handful of times and gaps — so a row costs two map
 * look-ups and an add, not a string key.
 */
export function tallyCounts(table: SurveyTable, options: TallyOptions): CountsTable {
  const { rows, states } = table;
  const k = states.length;
  const width = (k + 1) * k;
  const grouped = rows.group !== undefined && table.groups !== undefined;
  const groupCount = grouped ? table.groups!.length : 1;
  // time → Δt (0 for first surveys) → groupCount × (k + 1) × k counts; row 0 of each block is "first survey".
  const byTime = new Map<number, Map<number, Float64Array>>();
  const block = (time: number, dt: number): Float64Array => {
    let byGap = byTime.get(time);
    if (byGap === undefined) byTime.set(time, byGap = new Map());
    let dense = byGap.get(dt);
    if (dense === undefined) byGap.set(dt, dense = new Float64Array(groupCount * width));
    return dense;
  };
  // time → groupCount × k: sites whose last survey was then, by its state.
  const lastByTime = new Map<number, Float64Array>();
  const siteCells: SiteCell[] | undefined = options.perSite ? [] : undefined;
  const { site, time, state } = rows;
  for (let a = 0; a < rows.count;) {
    let b = a + 1;
    while (b < rows.count && site[b] === site[a]) b += 1;
    const g = grouped ? rows.group![a]! : 0;
    block(time[a]!, 0)[g * width + state[a]!] += 1;
    for (let n = a + 1; n < b; n++) {
      block(time[n]!, time[n]! - time[n - 1]!)[g * width + (state[n - 1]! + 1) * k + state[n]!] += 1;
    }
    let last = lastByTime.get(time[b - 1]!);
    if (last === undefined) lastByTime.set(time[b - 1]!, last = new Float64Array(groupCount * k));
    last[g * k + state[b - 1]!] += 1;
    if (siteCells) siteCells.push(...siteRows(table, a, b, options.step));
    a = b;
  }
  const cells: CountCell[] = [];
  for (const [t, byGap] of byTime) {
    for (const [dt, dense] of byGap) {
      dense.forEach((n, c) => {
        if (n === 0) return;
        const g = Math.floor(c / width);
        const from = Math.floor((c % width) / k) - 1;
        cells.push({ ...(grouped ? { group: table.groups![g]! } : {}), from, to: c % k, gap: dt / options.step, time: t, n, line: 0 });
      });
    }
  }
  for (const [t, last] of lastByTime) {
    last.forEach((n, c) => {
      if (n > 0) cells.push({ ...(grouped ? { group: table.groups![Math.floor(c / k)]! } : {}), from: c % k, to: LAST_SURVEY, gap: 0, time: t, n, line: 0 });
    });
  }
  return { file: table.file, sha256: table.sha256, states, step: options.step, grouped, cells: sortCells(cells),
    ...(siteCells ? { siteCells } : {}), repeatedRows: table.repeatedRows };
}

/** One site's rows (a … b − 1) as per-site cells, pooled over time, in (from, to, gap) order. */
function siteRows(table: SurveyTable, a: number, b: number, step: number): SiteCell[] {
  const { rows } = table;
  const id = table.sites[rows.site[a]!]!;
  const group = rows.group && table.groups ? { group: table.groups[rows.group[a]!]! } : {};
  const tally = new Map<string, { from: number; to: number; gap: number; n: number }>();
  const add = (from: number, to: number, gap: number): void => {
    const key = `${from} ${to} ${gap}`;
    const cell = tally.get(key);
    if (cell) cell.n += 1; else tally.set(key, { from, to, gap, n: 1 });
  };
  add(FIRST_SURVEY, rows.state[a]!, 0);
  for (let n = a + 1; n < b; n++) add(rows.state[n - 1]!, rows.state[n]!, (rows.time[n]! - rows.time[n - 1]!) / step);
  return sortSiteCells([...tally.values()].map((c) => ({ site: id, ...group, ...c, line: 0 })));
}
