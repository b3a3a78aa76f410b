import type { RowStore } from './row-store.js';
import type { SurveyRows } from './survey.js';

/** One row as given: its index among the rows given, and its fields. */
export interface GivenRow {
  readonly index: number;
  readonly site: number;
  readonly time: number;
  readonly state: number;
  readonly line: number;
}

/** Two rows of one site at one time in different states. */
export interface Conflict {
  readonly first: GivenRow;
  readonly later: GivenRow;
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
 *
 * The rows are taken from the store column by column, each released once its ordered copy is
 * made, so the peak is the rows once plus one column (not twice the rows).
 */
export function orderRows(store: RowStore, sites: number, earlier: (a: number, b: number) => boolean = (a, b) => a < b): OrderedRows {
  const { keep, repeated, conflict } = orderAndFindRepeats(store, sites, earlier);
  const gather = <T extends Int32Array | Float64Array | Uint8Array>(column: T): T => {
    const out = new (column.constructor as new (length: number) => T)(keep.length);
    for (let p = 0; p < keep.length; p++) out[p] = column[keep[p]!]!;
    return out;
  };
  const grouped = store.group !== undefined;
  const observed = store.observer !== undefined;
  const columns = store.release();
  const ordered: SurveyRows = {
    count: keep.length,
    time: gather(columns.take('time')),
    line: gather(columns.take('line')),
    site: gather(columns.take('site')),
    state: gather(columns.take('state')),
    ...(grouped ? { group: gather(columns.take('group')!) } : {}),
    ...(observed ? { observer: gather(columns.take('observer')!) } : {}),
  };
  return conflict ? { rows: ordered, repeated, conflict } : { rows: ordered, repeated };
}

/** The rows to keep, in order (a counting sort on site, then time within each site), and what repeats. */
function orderAndFindRepeats(store: RowStore, sites: number, earlier: (a: number, b: number) => boolean):
  { keep: Int32Array; repeated: number; conflict?: Conflict } {
  const n = store.count;
  const { site, time, state } = store;
  const start = new Int32Array(sites + 1);
  for (let r = 0; r < n; r++) start[site[r]! + 1] += 1;
  for (let s = 0; s < sites; s++) start[s + 1] += start[s]!;
  const order = new Int32Array(n);
  const next = start.slice(0, sites);
  for (let r = 0; r < n; r++) order[next[site[r]!]++] = r;

  let kept = 0;
  let repeated = 0;
  let conflict: [number, number] | undefined;
  for (let s = 0; s < sites; s++) {
    const a = start[s]!;
    const b = start[s + 1]!;
    sortByTime(order, a, b, time);
    let first = -1;
    for (let p = a; p < b; p++) {
      const r = order[p]!;
      if (first >= 0 && time[r] === time[first]) {
        if (state[r] === state[first]) repeated += 1;
        else if (conflict === undefined || earlier(r, conflict[1])) conflict = [first, r];
        continue;
      }
      first = r;
      order[kept++] = r;
    }
  }
  const given = (index: number): GivenRow => ({ index, site: site[index]!, time: time[index]!, state: state[index]!, line: store.line[index]! });
  const keep = order.subarray(0, kept);
  return conflict ? { keep, repeated, conflict: { first: given(conflict[0]), later: given(conflict[1]) } } : { keep, repeated };
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
