import type { ObservedMix } from '../evaluation/observed.js';
import { brierScore, covered, logScore } from '../evaluation/scores.js';

/** A stored forecast as far as scoring needs it (read back from a record's JSON). */
export interface ScorableForecast {
  readonly name: string;
  readonly years: readonly number[];
  readonly states: readonly string[];
  readonly start: { readonly year: number; readonly from: string };
  readonly treatments: readonly unknown[];
  readonly shares: Record<string, { median: number[]; low: number[]; high: number[]; mean: number[] }>;
  readonly plots: ({ total: number } & Record<string, unknown>) | null;
}

export interface RecordScore {
  readonly record: string;
  readonly scenario: string;
  readonly year: number;
  readonly sites: number;
  /** States whose observed share fell inside the forecast band. */
  readonly covered: number;
  readonly states: number;
  /** Whether the band was a prediction band for plot counts (true) or for the landscape share. */
  readonly plotBands: boolean;
  readonly logScore: number;
  readonly brierScore: number;
}

/**
 * Score an earlier record's forecasts against the surveys made since: for every year it forecast
 * that has now been surveyed, was each state's observed share inside the band (coverage), and
 * the log and Brier scores of the forecast mean shares for the observed sites (Gneiting & Raftery
 * 2007). Only forecasts that describe what was actually done can be scored: those starting from
 * the surveyed mix with no treatments. Share bands leave out plot-level chance and so cover an
 * observed mix of few plots less often than their level; plot-count bands include it.
 */
export function scoreRecord(record: string, forecasts: readonly ScorableForecast[], observed: ReadonlyMap<number, ObservedMix>,
  states: readonly string[]): RecordScore[] {
  const scores: RecordScore[] = [];
  for (const f of forecasts) {
    if (f.start.from !== 'latest' || f.treatments.length > 0) continue;
    f.years.forEach((year, t) => {
      const seen = observed.get(year);
      if (year <= f.start.year || !seen) return;
      // States matched by name; a state the record did not know gets probability 0.
      const mean = states.map((s) => f.shares[s]?.mean[t] ?? 0);
      const shares = states.map((_, s) => seen.counts[s]! / seen.sites);
      const band = (key: 'low' | 'high'): number[] => states.map((s) => {
        const plots = f.plots?.[s] as { low: number[]; high: number[] } | undefined;
        return plots ? plots[key][t]! / f.plots!.total : f.shares[s]?.[key][t] ?? 0;
      });
      scores.push({
        record, scenario: f.name, year, sites: seen.sites,
        covered: covered(shares, band('low'), band('high')), states: states.length, plotBands: f.plots !== null,
        logScore: logScore(mean, seen.counts), brierScore: brierScore(mean, seen.counts),
      });
    });
  }
  return scores;
}
