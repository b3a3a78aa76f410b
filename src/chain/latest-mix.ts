import type { SurveyRows } from '../data/survey.js';

export interface SurveyedMix {
  /** The latest survey time in the table. */
  readonly time: number;
  /** Number of sites in each state at that time, in state order. */
  readonly counts: readonly number[];
  readonly shares: readonly number[];
  readonly sites: number;
  /**
   * Sites not surveyed at the latest time, by the state of their last survey and how many whole
   * steps before the latest time it was: a forecast starts them from that state carried forward
   * through each matrix draw. Absent in old fit files (then no site is carried).
   */
  readonly carried?: readonly CarriedSites[];
  /** Sites last surveyed a time that is not a whole number of steps before the latest: not carried. */
  readonly notCarried?: number;
}

export interface CarriedSites {
  readonly state: number;
  /** Whole steps from the site's last survey to the latest survey time. */
  readonly steps: number;
  readonly sites: number;
}

/**
 * The mix of states among the sites surveyed at the latest survey time, and the sites last surveyed
 * earlier, by state and steps back (rows come ordered by site, then time: a site's last row is its
 * last survey). Those are carried forward by the forecast, so no site is left out of its start.
 */
export function latestSurveyedMix(rows: SurveyRows, k: number, step = 1): SurveyedMix {
  let time = -Infinity;
  for (let n = 0; n < rows.count; n++) if (rows.time[n]! > time) time = rows.time[n]!;
  const counts = new Array<number>(k).fill(0);
  const carried = new Map<number, number>();
  let sites = 0;
  let notCarried = 0;
  for (let n = 0; n < rows.count; n++) {
    if (rows.time[n] === time) {
      counts[rows.state[n]!]! += 1;
      sites += 1;
    } else if (n + 1 === rows.count || rows.site[n + 1] !== rows.site[n]) {
      const gap = time - rows.time[n]!;
      if (gap % step !== 0) notCarried += 1;
      else carried.set((gap / step) * k + rows.state[n]!, (carried.get((gap / step) * k + rows.state[n]!) ?? 0) + 1);
    }
  }
  const list = [...carried].sort((a, b) => a[0] - b[0]).map(([key, n]) => ({ state: key % k, steps: Math.floor(key / k), sites: n }));
  return { time, counts, shares: counts.map((c) => c / sites), sites, carried: list, notCarried };
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

/**
 * The starting mix of every site under one matrix p (at `offset`): the sites surveyed at the latest
 * time as found, plus each site last surveyed g steps earlier in state s carried forward as
 * e_s·pᵍ (its state distribution now, given its last survey and p), over all sites. Written into
 * `out` (k shares).
 */
export function carriedMix(latest: SurveyedMix, p: ArrayLike<number>, k: number, offset: number, out: Float64Array): Float64Array {
  const carried = latest.carried ?? [];
  const total = latest.sites + carried.reduce((s, c) => s + c.sites, 0);
  const v = new Float64Array(k);
  const w = new Float64Array(k);
  for (let s = 0; s < k; s++) out[s] = latest.counts[s]!;
  for (const { state, steps, sites } of carried) {
    v.fill(0);
    v[state] = 1;
    for (let t = 0; t < steps; t++) {
      w.fill(0);
      for (let i = 0; i < k; i++) {
        if (v[i] === 0) continue;
        for (let j = 0; j < k; j++) w[j] += v[i]! * p[offset + i * k + j]!;
      }
      v.set(w);
    }
    for (let s = 0; s < k; s++) out[s] += sites * v[s]!;
  }
  for (let s = 0; s < k; s++) out[s] /= total;
  return out;
}

/** Sweep r's true latest counts as shares, into `out` at `offset`. */
export function trueShares(latest: Float64Array, r: number, k: number, out: Float64Array, offset: number): void {
  let total = 0;
  for (let x = 0; x < k; x++) total += latest[r * k + x]!;
  for (let x = 0; x < k; x++) out[offset + x] = latest[r * k + x]! / total;
}
