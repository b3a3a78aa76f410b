import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import type { RandomSource } from '../uncertainty/random.js';
import { propagate, type Trajectories } from './propagate.js';
import { bandOf, discreteBandOf, type Band } from './quantiles.js';
import { stationaryOfDraws } from './stationary-draws.js';

export interface ShareBands {
  readonly median: number[];
  readonly low: number[];
  readonly high: number[];
  readonly mean: number[];
}

/** When something first happens in the landscape, over the draws in which it happens at all. */
export interface FirstTime {
  /** Fraction of draws in which it happens within the horizon (including the start year). */
  readonly probability: number;
  /** Calendar years, among the draws in which it happens; null when it never does. */
  readonly year: Band | null;
}

export interface ForecastResult {
  readonly scenario: Scenario;
  readonly seed: number;
  readonly draws: number;
  /** Calendar year of every step 0 … horizon. */
  readonly years: number[];
  /** Per state, in state order. */
  readonly shares: ShareBands[];
  readonly stationary: { readonly bands: Band[] | null; readonly unique: number; readonly notUnique: number };
  /** Landscape-level: the first year the target's share of the whole area reaches the threshold. */
  readonly dominance: FirstTime | null;
  /** Per state: the first year it is the most common state in the landscape. */
  readonly mostCommon: FirstTime[];
  readonly notes: readonly string[];
}

/**
 * Run one scenario: draw matrices, propagate the starting mix, and summarise the draws into
 * bands by year, the stationary mix, and the landscape-level first times.
 */
export function runForecast(scenario: Scenario, random: RandomSource, onProgress?: (done: number, total: number) => void): ForecastResult {
  const { fit, level } = scenario;
  const k = fit.states.length;
  const matrices = drawMatrices(fit, scenario.source, scenario.draws, random);
  const paths = propagate(matrices, scenario.start.shares, scenario.horizonSteps, { target: scenario.target, onProgress });
  const years = Array.from({ length: scenario.horizonSteps + 1 }, (_, t) => scenario.start.year + t * fit.step);
  const stationary = stationaryOfDraws(matrices);
  const toYear = (step: number): number => scenario.start.year + step * fit.step;
  return {
    scenario,
    seed: random.seed,
    draws: matrices.count,
    years,
    shares: Array.from({ length: k }, (_, s) => shareBands(paths, s, level)),
    stationary: {
      bands: stationary.unique > 0
        ? Array.from({ length: k }, (_, s) => bandOf(strided(stationary.mixes, s, k, stationary.unique), level))
        : null,
      unique: stationary.unique,
      notUnique: stationary.notUnique,
    },
    dominance: scenario.target ? firstTime(paths.firstAtTarget, 0, 1, level, toYear) : null,
    mostCommon: Array.from({ length: k }, (_, s) => firstTime(paths.firstMostCommon, s, k, level, toYear)),
    notes: matrices.notes,
  };
}

function shareBands(paths: Trajectories, state: number, level: number): ShareBands {
  const { draws, k, shares, recorded } = paths;
  const R = recorded.length;
  const out: ShareBands = { median: [], low: [], high: [], mean: [] };
  const column = new Float64Array(draws);
  for (let r = 0; r < R; r++) {
    for (let d = 0; d < draws; d++) column[d] = shares[(d * R + r) * k + state]!;
    const band = bandOf(column, level);
    out.median.push(band.median);
    out.low.push(band.low);
    out.high.push(band.high);
    out.mean.push(band.mean);
  }
  return out;
}

/** Every `stride`-th value from `offset`: one state's column out of a [draw][state] array. */
function strided(values: Float64Array, offset: number, stride: number, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let d = 0; d < n; d++) out[d] = values[d * stride + offset]!;
  return out;
}

function firstTime(first: Int32Array, offset: number, stride: number, level: number, toYear: (step: number) => number): FirstTime {
  const draws = first.length / stride;
  const reached: number[] = [];
  for (let d = 0; d < draws; d++) {
    const step = first[d * stride + offset]!;
    if (step >= 0) reached.push(step);
  }
  if (reached.length === 0) return { probability: 0, year: null };
  const band = discreteBandOf(Int32Array.from(reached), level);
  return {
    probability: reached.length / draws,
    year: { median: toYear(band.median), low: toYear(band.low), high: toYear(band.high) },
  };
}
