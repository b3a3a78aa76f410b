import { SereError } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import { gcd } from './structure.js';
import { SiteCountBuilder, type SiteCountTable } from './site-counts.js';

/**
 * Pairs of consecutive surveys that were not used, by their gap in time units. Fit files written
 * before gaps were modelled list them; every pair is now used or refused, so new fits have none.
 */
export interface SkippedPairs {
  readonly gap: number;
  readonly pairs: number;
}

/** Pairs of consecutive surveys of one site, by their gap in steps (1 = the one-step transitions). */
export interface PairsByGap {
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
  /** Every pair used, by gap in steps: one-step transitions first, then the pairs in `gapCounts`. */
  readonly pairsByGap: readonly PairsByGap[];
  /** Pairs two or more whole steps apart, pooled by (from, to, gap). */
  readonly gapCounts: readonly GapCell[];
  /** For each cell of `gapCounts`, the CSV line of the later survey of its first pair: for messages. */
  readonly gapLines: readonly number[];
  /** Sites surveyed once only: no pair, so no information about change (reported, not an error). */
  readonly singleSurveySites: number;
  /**
   * Every site's pairs two or more steps apart, for the site bootstrap: site s (as in `sites`) holds
   * cells (g − 2)·k² + i·k + j with their counts.
   */
  readonly siteGaps: SiteCountTable;
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
 * statistic of a stationary first-order chain observed on independent sites), and pairs a whole
 * number g ≥ 2 of steps apart by (from, to, g): with them, the sufficient statistics of the gap
 * likelihood, which the fit uses (chain/gap-em.ts).
 *
 * A pair whose gap is not a whole number of steps cannot be placed on the chain's clock: it is an
 * error (GAP_NOT_WHOLE_STEPS) at the later survey's line — the earliest such line in the file —
 * suggesting the step that divides every gap.
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
  const byGap = new Map<number, Float64Array>();
  const gapLine = new Map<number, Float64Array>();
  let allGaps = 0;
  let badLine = 0;
  let badGap = 0;
  let singleSurveySites = 0;
  const triples = new Float64Array(k * k * k);
  const periods = new Map<number, Float64Array>();
  const siteCells = new Int32Array(k * k);
  const touched: number[] = [];
  const siteGaps = new SiteCountBuilder(k, false);
  const siteGapCells = new Map<number, number>();
  let transitions = 0;
  for (let a = 0; a < rows.count;) {
    let b = a + 1;
    while (b < rows.count && site[b] === site[a]) b += 1;
    if (b - a === 1) singleSurveySites += 1;
    for (let n = a + 1; n < b; n++) {
      const gap = time[n]! - time[n - 1]!;
      allGaps = gcd(allGaps, gap);
      if (gap % step !== 0) {
        if (badLine === 0 || line[n]! < badLine) { badLine = line[n]!; badGap = gap; }
        continue;
      }
      if (gap !== step) {
        let dense = byGap.get(gap / step);
        let lines = gapLine.get(gap / step);
        if (dense === undefined) byGap.set(gap / step, dense = new Float64Array(k * k));
        if (lines === undefined) gapLine.set(gap / step, lines = new Float64Array(k * k));
        const cell = state[n - 1]! * k + state[n]!;
        dense[cell] += 1;
        if (lines[cell] === 0 || line[n]! < lines[cell]!) lines[cell] = line[n]!;
        const wide = (gap / step - 2) * k * k + cell;
        siteGapCells.set(wide, (siteGapCells.get(wide) ?? 0) + 1);
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
    for (const wide of [...siteGapCells.keys()].sort((x, y) => x - y)) siteGaps.cell(wide, siteGapCells.get(wide)!);
    siteGapCells.clear();
    siteGaps.endSite(table.sites[site[a]!]!, undefined);
    sites.endSite(table.sites[site[a]!]!, rows.group && table.groups ? table.groups[rows.group[a]!]! : undefined);
    a = b;
  }
  if (badLine > 0) throw gapNotWholeSteps(table.file, badLine, badGap, step, allGaps);
  const tripleList = sparseTriples(triples, k);
  const gapCounts = gapCellsOf(byGap, k);
  const gapLines = gapCounts.map(([i, j, g]) => gapLine.get(g)![i * k + j]!);
  const pairsByGap = pairsByGapOf(transitions, gapCounts);
  return {
    k, counts, sites: sites.table(), transitions, pairsByGap, gapCounts, gapLines, singleSurveySites, siteGaps: siteGaps.table(), firstLine, triples: tripleList,
    periods: periodList(periods, k),
  };
}

/** A dense k×k table as sparse `[from, to, n]` cells in cell order. */
function sparseCells(dense: Float64Array, k: number): [number, number, number][] {
  const cells: [number, number, number][] = [];
  dense.forEach((n, cell) => { if (n > 0) cells.push([Math.floor(cell / k), cell % k, n]); });
  return cells;
}

/** Dense per-period tables (keyed by the time the transitions started) as sparse periods in time order. */
export function periodList(periods: ReadonlyMap<number, Float64Array>, k: number): PeriodCounts[] {
  return [...periods].sort((x, y) => x[0] - y[0]).map(([time, dense]) => ({ time, cells: sparseCells(dense, k) }));
}

/** Dense k×k tables by gap (in steps) as GapCells sorted by gap, from, to. */
export function gapCellsOf(byGap: ReadonlyMap<number, Float64Array>, k: number): GapCell[] {
  const cells: GapCell[] = [];
  for (const g of [...byGap.keys()].sort((x, y) => x - y)) for (const [i, j, n] of sparseCells(byGap.get(g)!, k)) cells.push([i, j, g, n]);
  return cells;
}

/** A dense k³ table of runs of three as sparse `[i, j, l, n]` in cell order. */
export function sparseTriples(triples: Float64Array, k: number): (readonly [number, number, number, number])[] {
  const list: (readonly [number, number, number, number])[] = [];
  triples.forEach((n, c) => { if (n > 0) list.push([Math.floor(c / (k * k)), Math.floor(c / k) % k, c % k, n]); });
  return list;
}

export { compareCodePoints } from '../data/code-points.js';

/** Sum sparse cells (a period's, a site's in a fit file) into a dense k×k table. */
export function addSiteCells(target: Float64Array, k: number, cells: readonly (readonly [number, number, number])[], weight = 1): void {
  for (const [i, j, n] of cells) target[i * k + j] += weight * n;
}

/** The most common gap among pairs (in whatever unit they are given): what `--step` should probably be. */
export function likelyStep(pairs: readonly PairsByGap[]): number | undefined {
  let best: PairsByGap | undefined;
  for (const s of pairs) if (s.gap > 0 && (!best || s.pairs > best.pairs)) best = s;
  return best?.gap;
}


/**
 * A pair whose gap is not a whole number of steps cannot be placed on the chain's clock: the one
 * error for survey tables, counts tables and raster stacks, suggesting the step (`divisor`, in time
 * units) that divides every gap.
 */
export function gapNotWholeSteps(file: string, line: number, gap: number, step: number, divisor: number): SereError {
  return new SereError('GAP_NOT_WHOLE_STEPS', `two surveys of a site are ${gap} time unit${gap === 1 ? '' : 's'} apart, not a whole number of ${step}-unit steps`,
    { file, ...(line > 0 ? { line } : {}) },
    `every gap is a whole number of ${divisor}-unit steps: try --step ${divisor}, or check the survey times`);
}

/** Pairs by gap in steps — the one-step transitions, then each gap of `gapCounts` — as a fit reports them. */
export function pairsByGapOf(transitions: number, gapCounts: readonly GapCell[]): PairsByGap[] {
  const out: PairsByGap[] = transitions > 0 ? [{ gap: 1, pairs: transitions }] : [];
  for (const [, , g, n] of gapCounts) {
    const last = out[out.length - 1];
    if (last && last.gap === g) out[out.length - 1] = { gap: g, pairs: last.pairs + n };
    else out.push({ gap: g, pairs: n });
  }
  return out;
}
