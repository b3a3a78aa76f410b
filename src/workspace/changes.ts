import type { Fit } from '../fit/fit.js';
import type { ForecastResult } from '../engine/forecast.js';

/** What a record keeps of a forecast, as read back from its JSON. */
export interface StoredForecast {
  readonly name: string;
  readonly years: readonly number[];
  readonly shares: Record<string, { median: number[]; low: number[]; high: number[] }>;
}

/** What a record keeps of the fit, as read back from fit.json. */
export interface StoredFit {
  readonly states: readonly string[];
  readonly counts: readonly (readonly number[])[];
  readonly probabilities: readonly (readonly number[])[];
  readonly input: { readonly sha256: string };
  readonly data: { readonly sites: number; readonly transitions: number };
}

export interface HorizonShare {
  readonly year: number;
  readonly median: number;
  readonly low: number;
  readonly high: number;
}

export interface Changes {
  readonly previous: string;
  readonly dataChanged: boolean;
  readonly sites: { readonly before: number; readonly now: number };
  readonly transitions: { readonly before: number; readonly now: number };
  /** Per scenario and state: the horizon share before and now. */
  readonly forecasts: readonly { readonly scenario: string; readonly state: string; readonly before: HorizonShare; readonly now: HorizonShare }[];
  /** The fitted (MLE) transition probabilities that moved most, with the new transitions out of their from-state. */
  readonly moved: readonly { readonly from: string; readonly to: string; readonly before: number; readonly now: number; readonly newTransitions: number }[];
}

/** How many of the largest probability moves to list. */
export const MOVED_SHOWN = 5;

/**
 * What changed since the previous record: whether the data changed at all, how many transitions
 * were added, how each scenario's horizon median and band moved (scenarios and states matched by
 * name), and which transition probabilities moved most and on how many new transitions.
 */
export function changesSince(previous: string, before: { fit: StoredFit; forecasts: readonly StoredForecast[] },
  fit: Fit, estimates: { p: Float64Array }, results: readonly ForecastResult[]): Changes {
  const k = fit.states.length;
  const forecasts: Changes['forecasts'][number][] = [];
  for (const r of results) {
    const old = before.forecasts.find((f) => f.name === r.scenario.name);
    if (!old) continue;
    fit.states.forEach((state, s) => {
      const o = old.shares[state];
      if (!o) return;
      const last = old.years.length - 1;
      const t = r.years.length - 1;
      forecasts.push({
        scenario: r.scenario.name,
        state,
        before: { year: old.years[last]!, median: o.median[last]!, low: o.low[last]!, high: o.high[last]! },
        now: { year: r.years[t]!, median: r.shares[s]!.median[t]!, low: r.shares[s]!.low[t]!, high: r.shares[s]!.high[t]! },
      });
    });
  }
  const moved: Changes['moved'][number][] = [];
  fit.states.forEach((from, i) => {
    const bi = before.fit.states.indexOf(from);
    if (bi < 0) return;
    const rowNow = Array.from({ length: k }, (_, j) => fit.counts[i * k + j]!).reduce((a, b) => a + b, 0);
    const rowBefore = before.fit.counts[bi]!.reduce((a, b) => a + b, 0);
    fit.states.forEach((to, j) => {
      const bj = before.fit.states.indexOf(to);
      if (bj < 0) return;
      moved.push({ from, to, before: before.fit.probabilities[bi]![bj]!, now: estimates.p[i * k + j]!, newTransitions: rowNow - rowBefore });
    });
  });
  moved.sort((a, b) => Math.abs(b.now - b.before) - Math.abs(a.now - a.before));
  return {
    previous,
    dataChanged: before.fit.input.sha256 !== fit.input.sha256,
    sites: { before: before.fit.data.sites, now: fit.sites.length },
    transitions: { before: before.fit.data.transitions, now: fit.transitions },
    forecasts,
    moved: moved.filter((m) => m.now !== m.before).slice(0, MOVED_SHOWN),
  };
}
