import type { SurveyRows } from '../data/survey.js';

export interface SurveyedMix {
  /** The latest survey time in the table. */
  readonly time: number;
  /** Number of sites in each state at that time, in state order. */
  readonly counts: readonly number[];
  readonly shares: readonly number[];
  readonly sites: number;
}

/**
 * The mix of states among the sites surveyed at the latest survey time: the natural starting point
 * of a forecast. Sites last seen earlier are not carried forward (their state now is unknown).
 */
export function latestSurveyedMix(rows: SurveyRows, k: number): SurveyedMix {
  let time = -Infinity;
  for (let n = 0; n < rows.count; n++) if (rows.time[n]! > time) time = rows.time[n]!;
  const counts = new Array<number>(k).fill(0);
  let sites = 0;
  for (let n = 0; n < rows.count; n++) {
    if (rows.time[n] !== time) continue;
    counts[rows.state[n]!]! += 1;
    sites += 1;
  }
  return { time, counts, shares: counts.map((c) => c / sites), sites };
}

/** The surveyed mix at one survey time: sites in each state, in state order. */
export interface MixAtTime {
  readonly time: number;
  readonly counts: readonly number[];
  readonly sites: number;
}

/**
 * The surveyed mix at every survey time, earliest first: the history a chart draws before the
 * forecast, and the observations earlier forecasts are scored against (evaluation/observed.ts).
 */
export function surveyedMixes(rows: SurveyRows, k: number): MixAtTime[] {
  const byTime = new Map<number, number[]>();
  for (let n = 0; n < rows.count; n++) {
    const time = rows.time[n]!;
    const counts = byTime.get(time) ?? new Array<number>(k).fill(0);
    counts[rows.state[n]!]! += 1;
    byTime.set(time, counts);
  }
  return [...byTime].sort((a, b) => a[0] - b[0])
    .map(([time, counts]) => ({ time, counts, sites: counts.reduce((a, b) => a + b, 0) }));
}
