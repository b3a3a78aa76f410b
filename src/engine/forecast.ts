import type { Scenario } from '../scenario/scenario.js';
import { scenarioDraws, zoneView } from './scenario-draws.js';
import { zoneForecasts, type ZoneForecast } from './zone-forecast.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import { bandOf, discreteBandOf, type Band } from './quantiles.js';
import { timingBand } from './timing-band.js';
import { targetMet } from './target.js';
import { simulate, type Simulation } from './simulate.js';
import { checkScenarios } from './check-treatments.js';
import { stationaryOfDraws, stationaryOfObservedRows, type ObservedRowsStationary, type StationaryDraws } from './stationary-draws.js';
import { priorSensitivity, type PriorSensitivity } from './prior-sensitivity.js';
import { treatedStationary } from './treated-stationary.js';
import { splitUncertainty, type UncertaintySplit } from './uncertainty-split.js';
import { columnStart, type DrawLayout } from './layout.js';
import { appendBand, emptyBands, type ShareBands } from './year-bands.js';
import type { EngineOptions } from './engine-options.js';
import { variationSummary, type RowVariationSummary } from './variation-summary.js';

export type { ShareBands } from './year-bands.js';

/** When something first happens in the landscape, over the draws in which it happens at all. */
export interface FirstTime {
  /** Fraction of draws in which it happens within the horizon (including the start year). */
  readonly probability: number;
  /** How many draws it happens in: what `year` rests on. */
  readonly draws: number;
  /** Calendar years, among the draws in which it happens; null in fewer than MIN_BAND_DRAWS draws (timing-band.ts). */
  readonly year: Band | null;
}

/**
 * The landscape target over the draws. `probability` and `year` are for reaching it: the first
 * year from which it holds `staysMet` consecutive steps within the horizon. A draw in which it
 * holds at the horizon but for fewer steps than that (and never for long enough before) is not
 * counted as reaching it — the forecast cannot see whether the run would last — and is counted in
 * `shortAtHorizon`.
 */
export interface TargetOutcome extends FirstTime {
  /** Met by the starting mix, which every draw shares; `year` is then null unless staysMet > 1. */
  readonly alreadyMet: boolean;
  /** Fraction of draws in which it is met in the horizon year. */
  readonly holdsAtHorizon: number;
  /** Fraction of draws in which it is met in every year from the start to the horizon. */
  readonly holdsThroughout: number;
  /** Draws met at the horizon by a run shorter than staysMet that were not counted as reaching it. */
  readonly shortAtHorizon: number;
}

export interface ForecastResult {
  readonly scenario: Scenario;
  readonly seed: number;
  readonly draws: number;
  /** The steps summarised (every step 0 … horizon for a forecast; the shown ones in a comparison). */
  readonly steps: readonly number[];
  /** Calendar year of each of `steps`; every by-year array below is aligned with it. */
  readonly years: number[];
  /** Per state, in state order. */
  readonly shares: ShareBands[];
  /** Per state: prediction bands for the number of plots (whole numbers), when the scenario asks. */
  readonly plots: ShareBands[] | null;
  /** Of the drawn matrices (management and events aside). */
  readonly stationary: { readonly bands: Band[] | null; readonly unique: number; readonly notUnique: number };
  /**
   * The same without the states never surveyed as a from-state (stationary-draws.ts): null when
   * every state was; `bands` null when no draw gives a unique mix (the counts say why).
   */
  readonly observedRows: {
    readonly dropped: readonly number[];
    readonly bands: Band[] | null;
    readonly unique: number;
    readonly notUnique: number;
    readonly undefinedDraws: number;
  } | null;
  /**
   * The long-run mix if the treatments acting in the horizon year went on for ever: the
   * area-weighted mixture of the sub-populations' stationary mixes (treated-stationary.ts). Not the
   * fitted chain's long-run mix (`stationary`). Null when no treatment acts in the horizon year.
   */
  readonly treatedStationary: {
    readonly year: number;
    /** Indices into scenario.treatments. */
    readonly treatments: readonly number[];
    readonly bands: Band[] | null;
    readonly unique: number;
    readonly notUnique: number;
  } | null;
  /** States whose rows rest mostly on the prior: their shares under three priors (prior-sensitivity.ts). */
  readonly priorSensitivity: readonly PriorSensitivity[];
  /** Landscape-level: when the target (a summed share of the whole area) is reached, and whether it holds. */
  readonly dominance: TargetOutcome | null;
  /** Per state: the first year it is the most common state in the landscape. */
  readonly mostCommon: FirstTime[];
  /** Where the band at the horizon comes from, when more than one source adds to it. */
  readonly split: UncertaintySplit | null;
  /** Per state, its year-to-year variation (variation-summary.ts); null when no row varies. */
  readonly variation: RowVariationSummary[] | null;
  /** Zones fitted each on their own (pooling: none): each zone's own κ per state; else null. */
  readonly variationByZone: readonly { readonly zone: string; readonly rows: RowVariationSummary[] | null }[] | null;
  /** A stratified forecast's zones, each alone (zone-forecast.ts), when asked for (`--zones`); else null. */
  readonly zones: readonly ZoneForecast[] | null;
  readonly notes: readonly string[];
  /**
   * With observer error and `start: latest`: the start the forecast used, the posterior mean over
   * the draws of each draw's true starting mix (MatrixDraws.starts) — not the recorded mix, which
   * the scenario's `start.shares` holds. Absent otherwise.
   */
  readonly trueStart?: readonly number[];
}

/** Run one scenario end to end: draw matrices, simulate, summarise. */
export function runForecast(scenario: Scenario, random: RandomStream, onProgress?: (done: number, total: number) => void,
  engine: EngineOptions = {}, show: { readonly zones?: boolean } = {}): ForecastResult {
  checkScenarios([scenario]);
  const matrices = scenarioDraws(scenario, scenario.draws, random.stream('matrices'));
  const sim = simulate(scenario, matrices, random, { onProgress, chunkBytes: engine.chunkBytes, threads: engine.threads });
  const result = summarise(scenario, matrices, sim, random, { engine });
  return show.zones && scenario.zones ? { ...result, zones: zoneForecasts(scenario, matrices, random, engine) } : result;
}

/**
 * Summarise a simulation into bands by year, the stationary mix of the draws, the
 * landscape-level first times, and the uncertainty split.
 */
export function summarise(scenario: Scenario, matrices: MatrixDraws, sim: Simulation, random: RandomStream,
  options: { readonly split?: boolean; readonly stationary?: StationaryDraws; readonly observedRows?: ObservedRowsStationary | null;
    /** False to skip the prior checks (observedRows, priorSensitivity), as a hindcast does. */
    readonly priorChecks?: boolean;
    readonly engine?: EngineOptions } = {}): ForecastResult {
  const { fit, level } = scenario;
  const k = fit.states.length;
  const paths = sim.tracks;
  const years = paths.recorded.map((t) => scenario.start.year + t * fit.step);
  const stationary = options.stationary ?? stationaryOfDraws(matrices, scenario.zones?.shares, sim.threads);
  const toYear = (step: number): number => scenario.start.year + step * fit.step;
  const priorChecks = options.priorChecks !== false;
  const observed = !priorChecks ? null
    : options.observedRows !== undefined ? options.observedRows : stationaryOfObservedRows(matrices, fit.counts);
  const bandsOf = (st: StationaryDraws): Band[] | null => (st.unique > 0
    ? Array.from({ length: k }, (_, s) => bandOf(strided(st.mixes, s, k, st.unique), level))
    : null);
  const treated = treatedStationary(scenario, matrices, sim.threads);
  // With observer error each draw starts from its own true mix: the start the forecast reports (and
  // judges "already met" by) is their mean, not the recorded mix.
  const trueStart = matrices.starts && scenario.start.from === 'latest' && !scenario.zones ? meanStart(matrices.starts, k, matrices.count) : undefined;
  return {
    scenario,
    seed: random.seed,
    draws: matrices.count,
    steps: paths.recorded,
    years,
    shares: sim.shares,
    plots: sim.plots ? Array.from({ length: k }, (_, s) => bandsByStep(sim.plots!.counts, sim.plots!, s, level)) : null,
    stationary: { bands: bandsOf(stationary), unique: stationary.unique, notUnique: stationary.notUnique },
    observedRows: observed && {
      dropped: observed.dropped,
      bands: bandsOf(observed.stationary),
      unique: observed.stationary.unique,
      notUnique: observed.stationary.notUnique,
      undefinedDraws: observed.undefinedDraws,
    },
    treatedStationary: treated && {
      year: toYear(treated.step), treatments: treated.treatments, bands: bandsOf(treated), unique: treated.unique, notUnique: treated.notUnique,
    },
    priorSensitivity: priorChecks ? priorSensitivity(scenario, random.stream('prior-sensitivity')) : [],
    dominance: scenario.target ? targetOutcome(scenario, trueStart ?? scenario.start.shares, paths, toYear) : null,
    mostCommon: Array.from({ length: k }, (_, s) => firstTime(paths.firstMostCommon, s, k, level, toYear)),
    split: options.split === false ? null : splitUncertainty(scenario, matrices, sim, random, options.engine),
    variation: variationSummary(matrices, level),
    variationByZone: matrices.zoneVariation && scenario.zones
      ? scenario.zones.names.map((zone, z) => ({ zone, rows: variationSummary(zoneView(matrices, z), level) })) : null,
    zones: null,
    notes: sim.notes,
    ...(trueStart ? { trueStart } : {}),
  };
}

/** The mean over D draws of their starting mixes (D × k, draw-major). */
function meanStart(starts: Float64Array, k: number, D: number): number[] {
  const mean = new Array<number>(k).fill(0);
  for (let d = 0; d < D; d++) for (let s = 0; s < k; s++) mean[s] += starts[d * k + s]! / D;
  return mean;
}

/**
 * Whole-number bands (type 1 quantiles) of one state's plot counts over draws at each recorded
 * step. Sorting reorders its input, and the draws must stay aligned: work on one scratch copy.
 */
function bandsByStep(values: Int32Array, layout: DrawLayout, state: number, level: number): ShareBands {
  const out = emptyBands();
  const { draws, slots } = layout;
  const column = new Int32Array(draws);
  for (let r = 0; r < slots; r++) {
    const from = columnStart(layout, r, state);
    column.set(values.subarray(from, from + draws));
    let sum = 0;
    for (let d = 0; d < draws; d++) sum += column[d]!;
    appendBand(out, discreteBandOf(column, level), sum / draws);
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
  const band = timingBand(Int32Array.from(reached), level);
  return {
    probability: reached.length / draws,
    draws: reached.length,
    year: band && { median: toYear(band.median), low: toYear(band.low), high: toYear(band.high) },
  };
}

function targetOutcome(scenario: Scenario, start: ArrayLike<number>, paths: Simulation['tracks'], toYear: (step: number) => number): TargetOutcome {
  const target = scenario.target!;
  const { draws, horizon } = paths;
  const alreadyMet = targetMet(target, start);
  const reach = firstTime(paths.firstAtTarget, 0, 1, scenario.level, toYear);
  let atHorizon = 0; let throughout = 0; let short = 0;
  for (let d = 0; d < draws; d++) {
    const run = paths.targetRunAtHorizon[d]!;
    if (run > 0) atHorizon += 1;
    if (run === horizon + 1) throughout += 1;
    if (run > 0 && paths.firstAtTarget[d] === -1) short += 1;
  }
  return {
    ...reach,
    // Met at the start and counted from its first year: the first year is the start, not a finding.
    year: alreadyMet && target.staysMet === 1 ? null : reach.year,
    alreadyMet,
    holdsAtHorizon: atHorizon / draws,
    holdsThroughout: throughout / draws,
    shortAtHorizon: short,
  };
}
