import type { SurveyRows } from '../data/survey.js';

export interface ObservedMix {
  readonly time: number;
  /** Sites in each state, in state order. */
  readonly counts: readonly number[];
  readonly sites: number;
}

/** The surveyed mix at every survey time: the observations forecasts are scored against. */
export function observedMixes(rows: SurveyRows, k: number): Map<number, ObservedMix> {
  const byTime = new Map<number, number[]>();
  for (let n = 0; n < rows.count; n++) {
    const time = rows.time[n]!;
    const counts = byTime.get(time) ?? new Array<number>(k).fill(0);
    counts[rows.state[n]!]! += 1;
    byTime.set(time, counts);
  }
  return new Map([...byTime].sort((a, b) => a[0] - b[0])
    .map(([time, counts]) => [time, { time, counts, sites: counts.reduce((a, b) => a + b, 0) }]));
}
