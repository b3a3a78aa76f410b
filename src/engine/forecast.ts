import type { Scenario } from '../scenario/scenario.js';
import { drawMatrices } from '../uncertainty/draw-matrices.js';
import type { RandomSource } from '../uncertainty/random.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { bandOf, discreteBandOf, type Band } from './quantiles.js';
import { simulate, type Simulation } from './simulate.js';
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
  /** Per state: prediction bands for the number of plots (whole numbers), when the scenario asks. */
  readonly plots: ShareBands[] | null;
  /** Of the drawn matrices (management and events aside). */
  readonly stationary: { readonly bands: Band[] | null; readonly unique: number; readonly notUnique: number };
  /** Landscape-level: the first year the target's share of the whole area reaches the threshold. */
  readonly dominance: FirstTime | null;
  /** Per state: the first year it is the most common state in the landscape. */
  readonly mostCommon: FirstTime[];
  readonly notes: readonly string[];
}

/** Run one scenario end to end: draw matrices, simulate, summarise. */
export function runForecast(scenario: Scenario, random: RandomSource, onProgress?: (done: number, total: number) => void): ForecastResult {
  const matrices = drawMatrices(scenario.fit, scenario.source, scenario.draws, random);
  return summarise(scenario, matrices, simulate(scenario, matrices, random.seed, {}, onProgress), random.seed);
}

/**
 * Summarise a simulation into bands by year, the stationary mix of the draws, and the
 * landscape-level first times.
 */
export function summarise(scenario: Scenario, matrices: MatrixDraws, sim: Simulation, seed: number): ForecastResult {
  const { fit, level } = scenario;
  const k = fit.states.length;
  const { paths } = sim;
  const years = paths.recorded.map((t) => scenario.start.year + t * fit.step);
  const stationary = stationaryOfDraws(matrices);
  const toYear = (step: number): number => scenario.start.year + step * fit.step;
  return {
    scenario,
    seed,
    draws: matrices.count,
    years,
    shares: Array.from({ length: k }, (_, s) => bandsByStep(paths.shares, paths.draws, paths.recorded.length, k, s, level)),
    plots: sim.plots
      ? Array.from({ length: k }, (_, s) => bandsByStep(sim.plots!.counts, paths.draws, paths.recorded.length, k, s, level))
      : null,
    stationary: {
      bands: stationary.unique > 0
        ? Array.from({ length: k }, (_, s) => bandOf(strided(stationary.mixes, s, k, stationary.unique), level))
        : null,
      unique: stationary.unique,
      notUnique: stationary.notUnique,
    },
    dominance: scenario.target ? firstTime(paths.firstAtTarget, 0, 1, level, toYear) : null,
    mostCommon: Array.from({ length: k }, (_, s) => firstTime(paths.firstMostCommon, s, k, level, toYear)),
    notes: sim.notes,
  };
}

/**
 * Bands of one state's values over draws at each recorded step, from a [draw][step][state]
 * array. Whole-number data (plot counts) get whole-number bands (type 1 quantiles).
 */
function bandsByStep(values: Float64Array | Int32Array, draws: number, steps: number, k: number, state: number, level: number): ShareBands {
  const out: ShareBands = { median: [], low: [], high: [], mean: [] };
  const whole = values instanceof Int32Array;
  const column = whole ? new Int32Array(draws) : new Float64Array(draws);
  for (let r = 0; r < steps; r++) {
    let sum = 0;
    for (let d = 0; d < draws; d++) {
      const v = values[(d * steps + r) * k + state]!;
      column[d] = v;
      sum += v;
    }
    const band = whole ? discreteBandOf(column as Int32Array, level) : bandOf(column as Float64Array, level);
    out.median.push(band.median);
    out.low.push(band.low);
    out.high.push(band.high);
    out.mean.push(sum / draws);
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
