import { fitMle, siteCount, type Fit } from '../fit/fit.js';
import type { ForecastResult } from '../engine/forecast.js';

/** What a record keeps of a forecast, as read back from its JSON. */
export interface StoredForecast {
  readonly name: string;
  readonly years: readonly number[];
  readonly shares: Record<string, { median: number[]; low: number[]; high: number[] }>;
}

export interface ShareAt {
  readonly median: number;
  readonly low: number;
  readonly high: number;
}

/**
 * One scenario and state in the same calendar year in both records, with the change split in two:
 * `data` = (new fit, previous start) − previous record, the effect of the new surveys; `start` =
 * now − (new fit, previous start), the effect of moving the start to the new latest survey. The
 * two add up to now − before (medians, in shares). Null where the previous start could not be
 * carried over (see rerun-from-start.ts).
 */
export interface ForecastChange {
  readonly scenario: string;
  readonly state: string;
  readonly year: number;
  readonly before: ShareAt;
  readonly newData: ShareAt | null;
  readonly now: ShareAt;
  readonly effects: { readonly data: number | null; readonly start: number | null };
}

export interface Changes {
  readonly format: 'sere-changes';
  readonly format_version: 2;
  readonly previous: string;
  readonly dataChanged: boolean;
  readonly sites: { readonly before: number; readonly now: number };
  readonly transitions: { readonly before: number; readonly now: number };
  /** Per scenario and state: the share in the latest year both records forecast. */
  readonly forecasts: readonly ForecastChange[];
  /**
   * Only when either record was fitted with an error table: the SHA-256 of each record's table (null
   * without one) and whether it changed — a new accuracy assessment moves the fit as new surveys do.
   */
  readonly error_table?: { readonly before: string | null; readonly now: string | null; readonly changed: boolean };
  /** The fitted (MLE) transition probabilities that moved most, with the new transitions out of their from-state. */
  readonly moved: readonly { readonly from: string; readonly to: string; readonly before: number; readonly now: number; readonly newTransitions: number }[];
}

/** How many of the largest probability moves to list. */
export const MOVED_SHOWN = 5;

/**
 * What changed since the previous record: whether the data changed at all, how many transitions
 * were added, how each scenario's share moved in the latest calendar year both records forecast
 * (horizon against horizon would compare different years once the start moves on) — split into
 * the effect of the new data and of moving the start, using `fromPreviousStart`, this season's
 * scenarios rerun with the new fit from the previous record's start — and which transition
 * probabilities moved most and on how many new transitions. Scenarios and states match by name.
 */
export function changesSince(previous: string, before: { chain: Fit; forecasts: readonly StoredForecast[] },
  fit: Fit, estimates: { p: Float64Array }, results: readonly ForecastResult[], fromPreviousStart: readonly ForecastResult[]): Changes {
  const k = fit.states.length;
  const forecasts: ForecastChange[] = [];
  for (const r of results) {
    const old = before.forecasts.find((f) => f.name === r.scenario.name);
    if (!old) continue;
    const rerun = fromPreviousStart.find((x) => x.scenario.name === r.scenario.name);
    const year = Math.max(...old.years.filter((y) => r.years.includes(y)));
    if (!Number.isFinite(year)) continue; // no year in common
    const [o, t] = [old.years.indexOf(year), r.years.indexOf(year)];
    const x = rerun ? rerun.years.indexOf(year) : -1;
    fit.states.forEach((state, s) => {
      const was = old.shares[state];
      if (!was) return;
      const at = (b: { median: readonly number[]; low: readonly number[]; high: readonly number[] }, i: number): ShareAt =>
        ({ median: b.median[i]!, low: b.low[i]!, high: b.high[i]! });
      const beforeAt = at(was, o);
      const now = at(r.shares[s]!, t);
      const newData = x >= 0 ? at(rerun!.shares[s]!, x) : null;
      forecasts.push({
        scenario: r.scenario.name, state, year, before: beforeAt, newData, now,
        effects: { data: newData && newData.median - beforeAt.median, start: newData && now.median - newData.median },
      });
    });
  }
  const moved: Changes['moved'][number][] = [];
  // The previous record's chain, loaded from its fit.json; its MLE is recomputed from its counts and
  // prior, exactly the probabilities that file holds.
  const earlier = before.chain;
  const kb = earlier.states.length;
  const pBefore = fitMle(earlier).p;
  const rowSum = (counts: ArrayLike<number>, width: number, row: number): number => {
    let n = 0;
    for (let j = 0; j < width; j++) n += counts[row * width + j]!;
    return n;
  };
  fit.states.forEach((from, i) => {
    const bi = earlier.states.indexOf(from);
    if (bi < 0) return;
    const newTransitions = rowSum(fit.counts, k, i) - rowSum(earlier.counts, kb, bi);
    fit.states.forEach((to, j) => {
      const bj = earlier.states.indexOf(to);
      if (bj < 0) return;
      moved.push({ from, to, before: pBefore[bi * kb + bj]!, now: estimates.p[i * k + j]!, newTransitions });
    });
  });
  moved.sort((a, b) => Math.abs(b.now - b.before) - Math.abs(a.now - a.before));
  return {
    format: 'sere-changes',
    format_version: 2,
    previous,
    dataChanged: earlier.input.sha256 !== fit.input.sha256,
    ...(earlier.errorModel || fit.errorModel ? { error_table: errorTableChange(earlier, fit) } : {}),
    sites: { before: siteCount(earlier), now: siteCount(fit) },
    transitions: { before: earlier.transitions, now: fit.transitions },
    forecasts,
    moved: moved.filter((m) => m.now !== m.before).slice(0, MOVED_SHOWN),
  };
}

/** The error tables of two records by their SHA-256 (null without one), and whether they differ. */
function errorTableChange(earlier: Fit, fit: Fit): NonNullable<Changes['error_table']> {
  const before = earlier.errorModel?.sha256 ?? null;
  const now = fit.errorModel?.sha256 ?? null;
  return { before, now, changed: before !== now };
}
