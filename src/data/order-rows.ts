import type { SurveyRows } from './survey.js';

/** Two rows of one site at one time in different states: indices into the rows as given. */
export interface Conflict {
  readonly first: number;
  readonly later: number;
}

export interface OrderedRows {
  /** Unique by (site, time), by site then time; each kept row is the first of its (site, time). */
  readonly rows: SurveyRows;
  /** Rows that repeated an earlier (site, time, state) exactly. */
  readonly repeated: number;
  /** The earliest row (in the given order) that contradicts the first row of its (site, time). */
  readonly conflict?: Conflict;
}

const SHORT_RUN = 32;

/**
 * Order rows by site (whose ids are already ranks, 0 … sites − 1) then time, and keep the first
 * row of each (site, time). The given order is file order (or file by file), and both sorts are
 * stable, so "first" and "earliest" mean what they meant when rows were checked one by one.
 *
 * What must be kept to count: the per-site counts and the latest mix need each site's surveys in
 * time order, and the duplicate check needs every (site, time) pair — so every row is kept, in
 * typed arrays (21 bytes a row), and nothing else: the order is one Int32Array, made by a counting
 * sort on site (linear), then each site's few surveys sorted by time.
 *
 * `earlier` says which of two contradicting rows the user meets first (by default, the one given
 * first); the conflict reported is the earliest.
 */
export function orderRows(rows: SurveyRows, sites: number, earlier: (a: number, b: number) => boolean = (a, b) => a < b): OrderedRows {
  const n = rows.count;
  const { site, time, state } = rows;
  const start = new Int32Array(sites + 1);
  for (let r = 0; r < n; r++) start[site[r]! + 1] += 1;
  for (let s = 0; s < sites; s++) start[s + 1] += start[s]!;
  const order = new Int32Array(n);
  const next = start.slice(0, sites);
  for (let r = 0; r < n; r++) order[next[site[r]!]++] = r;

  let kept = 0;
  let repeated = 0;
  let conflict: Conflict | undefined;
  for (let s = 0; s < sites; s++) {
    const a = start[s]!;
    const b = start[s + 1]!;
    sortByTime(order, a, b, time);
    let first = -1;
    for (let p = a; p < b; p++) {
      const r = order[p]!;
      if (first >= 0 && time[r] === time[first]) {
        if (state[r] === state[first]) repeated += 1;
        else if (conflict === undefined || earlier(r, conflict.later)) conflict = { first, later: r };
        continue;
      }
      first = r;
      order[kept++] = r;
    }
  }
  const keep = order.subarray(0, kept);
  const gather = <T extends Int32Array | Float64Array | Uint8Array>(column: T): T => {
    const out = new (column.constructor as new (length: number) => T)(kept);
    for (let p = 0; p < kept; p++) out[p] = column[keep[p]!]!;
    return out;
  };
  const ordered: SurveyRows = {
    count: kept, site: gather(site), time: gather(time), state: gather(state), line: gather(rows.line),
    ...(rows.group ? { group: gather(rows.group) } : {}),
  };
  return conflict ? { rows: ordered, repeated, conflict } : { rows: ordered, repeated };
}

/** Stable sort of order[a, b) by time: insertion sort for a site's few surveys (usually already in order). */
function sortByTime(order: Int32Array, a: number, b: number, time: Float64Array): void {
  if (b - a > SHORT_RUN) {
    const run = Array.from(order.subarray(a, b)).sort((x, y) => time[x]! - time[y]! || x - y);
    order.set(run, a);
    return;
  }
  for (let p = a + 1; p < b; p++) {
    const r = order[p]!;
    const t = time[r]!;
    let q = p - 1;
    while (q >= a && time[order[q]!]! > t) {
      order[q + 1] = order[q]!;
      q -= 1;
    }
    order[q + 1] = r;
  }
}
