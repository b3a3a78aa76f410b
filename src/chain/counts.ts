import type { SurveyTable } from '../data/survey.js';
import { SiteCountBuilder, type SiteCountTable } from './site-counts.js';

/** Pairs of consecutive surveys that were not exactly one step apart, by their gap in time units. */
export interface SkippedPairs {
  readonly gap: number;
  readonly pairs: number;
}

/**
 * Pairs of consecutive surveys of one site a whole number of steps apart (two or more), pooled:
 * `[from, to, gap, n]` with gap in steps, sorted by gap, from, to. A pair g steps apart is evidence
 * about Pᵍ; these counts by gap are the sufficient statistics of that likelihood. The one shape
 * shared by survey tables, fit files and counts tables.
 */
export type GapCell = readonly [from: number, to: number, gap: number, n: number];

/** Transitions that started at one survey time: what tests of time-homogeneity compare. */
export interface PeriodCounts {
  readonly time: number;
  readonly cells: readonly (readonly [number, number, number])[];
}

export interface TransitionCounts {
  readonly k: number;
  /** Row-major k×k: `counts[i*k + j]` transitions from state i to state j, pooled over sites. */
  readonly counts: Float64Array;
  readonly sites: SiteCountTable;
  readonly transitions: number;
  readonly skipped: readonly SkippedPairs[];
  /** Pairs two or more whole steps apart (also tallied in `skipped` until the gap model uses them). */
  readonly gapCounts: readonly GapCell[];
  /** For each cell, the CSV line of the later survey of its first transition (0 if none): for messages. */
  readonly firstLine: Float64Array;
  /** Runs of three surveys each one step apart, as sparse `[i, j, l, n]`: the data of the order tests. */
  readonly triples: readonly (readonly [number, number, number, number])[];
  /** One-step transitions grouped by the time they started, in time order. */
  readonly periods: readonly PeriodCounts[];
}

/**
 * Count transitions between consecutive surveys of the same site that are exactly `step` time units
 * apart, pooled over sites (Anderson & Goodman 1957: the pooled counts are the sufficient
 * statistic of a stationary first-order chain observed on independent sites).
 *
 * Pairs with any other gap are not silently dropped: they are tallied by gap in `skipped`.
 *
 * One pass over the table's rows, which come ordered by site (code-point order of the ids, so the
 * site bootstrap draws the same sites whatever the order of rows in the file) and then time. Per
 * period and per triple the counts are dense tables (at most 100 states: 100³ doubles), summed
 * into sparse cells at the end.
 */
export function countTransitions(table: SurveyTable, k: number, step: number): TransitionCounts {
  const { rows } = table;
  const { site, time, state, line } = rows;
  const counts = new Float64Array(k * k);
  const firstLine = new Float64Array(k * k);
  const sites = new SiteCountBuilder(k, rows.group !== undefined && table.groups !== undefined);
  const skipped = new Map<number, number>();
  const byGap = new Map<number, Float64Array>();
  const triples = new Float64Array(k * k * k);
  const periods = new Map<number, Float64Array>();
  const siteCells = new Int32Array(k * k);
  const touched: number[] = [];
  let transitions = 0;
  for (let a = 0; a < rows.count;) {
    let b = a + 1;
    while (b < rows.count && site[b] === site[a]) b += 1;
    for (let n = a + 1; n < b; n++) {
      const gap = time[n]! - time[n - 1]!;
      if (gap !== step) {
        skipped.set(gap, (skipped.get(gap) ?? 0) + 1);
        if (gap > step && gap % step === 0) {
          let dense = byGap.get(gap / step);
          if (dense === undefined) byGap.set(gap / step, dense = new Float64Array(k * k));
          dense[state[n - 1]! * k + state[n]!] += 1;
        }
        continue;
      }
      const cell = state[n - 1]! * k + state[n]!;
      counts[cell] += 1;
      // The earliest line in the file, whatever order the sites are visited in.
      if (firstLine[cell] === 0 || line[n]! < firstLine[cell]!) firstLine[cell] = line[n]!;
      if (siteCells[cell]++ === 0) touched.push(cell);
      transitions += 1;
      let period = periods.get(time[n - 1]!);
      if (period === undefined) periods.set(time[n - 1]!, period = new Float64Array(k * k));
      period[cell] += 1;
      if (n - 2 >= a && time[n - 1]! - time[n - 2]! === step) triples[state[n - 2]! * k * k + cell] += 1;
    }
    touched.sort((x, y) => x - y);
    for (const cell of touched) {
      sites.cell(cell, siteCells[cell]!);
      siteCells[cell] = 0;
    }
    touched.length = 0;
    sites.endSite(table.sites[site[a]!]!, rows.group && table.groups ? table.groups[rows.group[a]!]! : undefined);
    a = b;
  }
  const skippedList = [...skipped.entries()].sort((x, y) => x[0] - y[0]).map(([gap, pairs]) => ({ gap, pairs }));
  const tripleList: (readonly [number, number, number, number])[] = [];
  triples.forEach((n, c) => { if (n > 0) tripleList.push([Math.floor(c / (k * k)), Math.floor(c / k) % k, c % k, n]); });
  const gapCounts: GapCell[] = [];
  for (const g of [...byGap.keys()].sort((x, y) => x - y)) {
    for (const [i, j, n] of sparseCells(byGap.get(g)!, k)) gapCounts.push([i, j, g, n]);
  }
  return {
    k, counts, sites: sites.table(), transitions, skipped: skippedList, gapCounts, firstLine, triples: tripleList,
    periods: [...periods.entries()].sort((x, y) => x[0] - y[0]).map(([t, dense]) => ({ time: t, cells: sparseCells(dense, k) })),
  };
}

function sparseCells(dense: Float64Array, k: number): [number, number, number][] {
  const cells: [number, number, number][] = [];
  dense.forEach((n, cell) => { if (n > 0) cells.push([Math.floor(cell / k), cell % k, n]); });
  return cells;
}

export { compareCodePoints } from '../data/code-points.js';

/** Sum sparse cells (a period's, a site's in a fit file) into a dense k×k table. */
export function addSiteCells(target: Float64Array, k: number, cells: readonly (readonly [number, number, number])[], weight = 1): void {
  for (const [i, j, n] of cells) target[i * k + j] += weight * n;
}

/** The most common gap among skipped pairs: what `--step` should probably be. */
export function likelyStep(skipped: readonly SkippedPairs[]): number | undefined {
  let best: SkippedPairs | undefined;
  for (const s of skipped) if (s.gap > 0 && (!best || s.pairs > best.pairs)) best = s;
  return best?.gap;
}
