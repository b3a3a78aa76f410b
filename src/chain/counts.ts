import type { SurveyRecord } from '../data/survey.js';

/** Transitions of one site, as sparse `[from, to, n]` cells: what the site bootstrap resamples. */
export interface SiteCounts {
  readonly site: string;
  readonly group?: string;
  readonly cells: readonly (readonly [number, number, number])[];
}

/** Pairs of consecutive surveys that were not exactly one step apart, by their gap in time units. */
export interface SkippedPairs {
  readonly gap: number;
  readonly pairs: number;
}

/** Transitions that started at one survey time: what tests of time-homogeneity compare. */
export interface PeriodCounts {
  readonly time: number;
  readonly cells: readonly (readonly [number, number, number])[];
}

export interface TransitionCounts {
  readonly k: number;
  /** Row-major k×k: `counts[i*k + j]` transitions from state i to state j, pooled over sites. */
  readonly counts: Float64Array;
  readonly sites: readonly SiteCounts[];
  readonly transitions: number;
  readonly skipped: readonly SkippedPairs[];
  /** For each cell, the CSV line of the later survey of its first transition (0 if none): for messages. */
  readonly firstLine: Int32Array;
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
 */
export function countTransitions(records: readonly SurveyRecord[], k: number, step: number): TransitionCounts {
  const counts = new Float64Array(k * k);
  const firstLine = new Int32Array(k * k);
  const bySite = groupBySite(records);
  const sites: SiteCounts[] = [];
  const skipped = new Map<number, number>();
  const triples = new Map<number, number>();
  const periods = new Map<number, Map<number, number>>();
  let transitions = 0;
  for (const [site, rows] of bySite) {
    const ordered = [...rows].sort((a, b) => a.time - b.time);
    const cells = new Map<number, number>();
    for (let n = 1; n < ordered.length; n++) {
      const before = ordered[n - 1]!;
      const after = ordered[n]!;
      const gap = after.time - before.time;
      if (gap !== step) {
        skipped.set(gap, (skipped.get(gap) ?? 0) + 1);
        continue;
      }
      const cell = before.state * k + after.state;
      counts[cell] += 1;
      // The earliest line in the file, whatever order the sites are visited in.
      if (firstLine[cell] === 0 || after.line < firstLine[cell]!) firstLine[cell] = after.line;
      cells.set(cell, (cells.get(cell) ?? 0) + 1);
      transitions += 1;
      const period = periods.get(before.time) ?? new Map<number, number>();
      period.set(cell, (period.get(cell) ?? 0) + 1);
      periods.set(before.time, period);
      const earlier = ordered[n - 2];
      if (earlier && before.time - earlier.time === step) {
        const triple = (earlier.state * k + before.state) * k + after.state;
        triples.set(triple, (triples.get(triple) ?? 0) + 1);
      }
    }
    const group = ordered[0]!.group;
    const sparse = sparseCells(cells, k);
    sites.push(group === undefined ? { site, cells: sparse } : { site, group, cells: sparse });
  }
  const skippedList = [...skipped.entries()].sort((a, b) => a[0] - b[0]).map(([gap, pairs]) => ({ gap, pairs }));
  return {
    k, counts, sites, transitions, skipped: skippedList, firstLine,
    triples: [...triples.entries()].sort((a, b) => a[0] - b[0])
      .map(([c, n]) => [Math.floor(c / (k * k)), Math.floor(c / k) % k, c % k, n] as const),
    periods: [...periods.entries()].sort((a, b) => a[0] - b[0]).map(([time, m]) => ({ time, cells: sparseCells(m, k) })),
  };
}

function sparseCells(cells: Map<number, number>, k: number): [number, number, number][] {
  return [...cells.entries()].sort((a, b) => a[0] - b[0]).map(([cell, n]) => [Math.floor(cell / k), cell % k, n]);
}

/**
 * Sites in code-point order of their ids, not in order of appearance: the site bootstrap draws
 * sites by position in this list, so with the same seed a table with its rows shuffled must give
 * the same list, and the same draws.
 */
function groupBySite(records: readonly SurveyRecord[]): Map<string, SurveyRecord[]> {
  const bySite = new Map<string, SurveyRecord[]>();
  for (const r of records) {
    const list = bySite.get(r.site);
    if (list) list.push(r);
    else bySite.set(r.site, [r]);
  }
  return new Map([...bySite.entries()].sort((a, b) => compareCodePoints(a[0], b[0])));
}

/**
 * Code-point order. JavaScript's default sort compares UTF-16 code units, which puts characters
 * beyond U+FFFF before U+E000–U+FFFF; code points give the order other tools (and UTF-8 bytes) give.
 */
export function compareCodePoints(a: string, b: string): number {
  const x = a[Symbol.iterator]();
  const y = b[Symbol.iterator]();
  for (;;) {
    const p = x.next();
    const q = y.next();
    if (p.done || q.done) return p.done ? (q.done ? 0 : -1) : 1;
    const d = p.value.codePointAt(0)! - q.value.codePointAt(0)!;
    if (d !== 0) return d;
  }
}

/** Sum sparse per-site cells back into a dense k×k table (the counts of any set of sites add up). */
export function addSiteCells(target: Float64Array, k: number, cells: SiteCounts['cells'], weight = 1): void {
  for (const [i, j, n] of cells) target[i * k + j] += weight * n;
}

/** The most common gap among skipped pairs: what `--step` should probably be. */
export function likelyStep(skipped: readonly SkippedPairs[]): number | undefined {
  let best: SkippedPairs | undefined;
  for (const s of skipped) if (s.gap > 0 && (!best || s.pairs > best.pairs)) best = s;
  return best?.gap;
}
