import type { Scenario } from '../scenario/scenario.js';
import { scenarioDraws } from './scenario-draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { summarise, type ForecastResult } from './forecast.js';
import { appendBand, emptyBands, type ShareBands } from './year-bands.js';
import { bandOf, type Band } from './quantiles.js';
import { timingBand } from './timing-band.js';
import { simulateTogether, type Simulation } from './simulate.js';
import type { EngineOptions } from './engine-options.js';
import { checkScenarios } from './check-treatments.js';
import { stationaryOfDraws, stationaryOfObservedRows } from './stationary-draws.js';

/** Two alternatives' shares closer than this in a draw count as a tie, not as one doing better. */
export const TIE_TOLERANCE = 1e-12;

/** How often one alternative beats another over the draws; the three add up to 1. */
export interface Odds {
  readonly more: number;
  readonly tie: number;
  readonly less: number;
}

export interface AlternativeComparison {
  readonly result: ForecastResult;
  /** Per state, at each of the baseline's shown steps: the band of (alternative − baseline) share over draws. */
  readonly difference: ShareBands[];
  /** Per state, at each shown step: how often the alternative gives more of that state than the baseline. */
  readonly odds: Odds[][];
  /** The landscape target, when the scenarios set one. */
  readonly dominance: TargetComparison | null;
  /** Per state: the band of (alternative − baseline) share at the horizon, shown year or not (the difference chart's row). */
  readonly atHorizon: Band[];
}

/**
 * How the two alternatives fare against the landscape target, draw by draw. Every draw falls in
 * exactly one of the six outcomes (their fractions add up to 1); a draw in which neither reaches
 * the target is not a tie in timing, so it is counted apart rather than as "the same year".
 */
export interface TargetComparison {
  /** Chance of reaching it within the horizon: alternative minus baseline. */
  readonly probabilityDifference: number;
  /** Fractions of all draws. */
  readonly outcomes: {
    /** Both reach it: the alternative sooner, in the same year, or later. */
    readonly sooner: number;
    readonly same: number;
    readonly later: number;
    /** Only one of them reaches it within the horizon. */
    readonly onlyAlternative: number;
    readonly onlyBaseline: number;
    readonly neither: number;
  };
  /** Number of draws in which both reach it: what `years` rests on. */
  readonly bothDraws: number;
  /** Alternative's first year minus the baseline's, among draws where both reach it; null in fewer than MIN_BAND_DRAWS. */
  readonly years: Band | null;
}

export interface Comparison {
  readonly baseline: ForecastResult;
  readonly alternatives: readonly AlternativeComparison[];
}

/**
 * Run alternatives on common random numbers: one set of matrix draws, and event years and plot
 * noise from streams named by the seed, so that a difference between alternatives reflects the
 * management, not sampling noise (common random numbers; e.g. Law & Kelton, Simulation Modeling
 * and Analysis, ch. 11). The first scenario is the baseline.
 */
export function runComparison(scenarios: readonly Scenario[], random: RandomStream,
  onProgress?: (done: number, total: number) => void, options: { readonly everyYear?: boolean } = {},
  engine: EngineOptions = {}): Comparison {
  checkScenarios(scenarios);
  const first = scenarios[0]!;
  const draws = Math.max(...scenarios.map((s) => s.draws));
  const matrices = scenarioDraws(first, draws, random.stream('matrices'));
  // A comparison reports the shown years (and the horizon, for the target); `sere forecast` gives every year.
  const record = options.everyYear
    ? Array.from({ length: first.horizonSteps + 1 }, (_, t) => t)
    : [...new Set([...first.showSteps, first.horizonSteps])].sort((a, b) => a - b);
  // Differences at the shown years only: they are what a manager reads, and each band costs a
  // selection over all draws (the alternatives' own shares are still summarised every year).
  // The alternatives run side by side, so each shown year is paired draw by draw as it is made.
  const shown = new Set(first.showSteps);
  const paired = new Map<number, YearDifferences[]>();
  const column = new Float64Array(draws);
  const sims = simulateTogether(scenarios, matrices, random, {
    record, onProgress, chunkBytes: engine.chunkBytes, threads: engine.threads,
    onYear: (step, mixes) => {
      if (shown.has(step)) paired.set(step, mixes.slice(1).map((alt) => differencesAt(mixes[0]!, alt, first, column)));
    },
  });
  // The uncertainty split is a per-scenario question (sere forecast answers it); skipped here.
  // Every alternative shares the matrix draws, so their stationary mixes are worked out once.
  // (Alternatives of one file share its zones' areas too.)
  const stationary = stationaryOfDraws(matrices, first.zones?.shares, sims[0]!.threads);
  const observedRows = stationaryOfObservedRows(matrices, first.fit.counts);
  const results = scenarios.map((sc, n) => summarise(sc, matrices, sims[n]!, random, { split: false, stationary, observedRows, engine }));
  return {
    baseline: results[0]!,
    alternatives: results.slice(1).map((result, n) =>
      compareTo(first, sims[0]!, sims[n + 1]!, result, first.showSteps.map((t) => paired.get(t)![n]!), paired.get(first.horizonSteps)?.[n])),
  };
}

/** One shown year of one alternative against the baseline: per state, the band of differences and the odds. */
interface YearDifferences {
  readonly bands: { readonly band: Band; readonly mean: number }[];
  readonly odds: Odds[];
}

/** Per state, (alternative − baseline) share draw by draw at one step (mixes `[s*D + d]`). */
function differencesAt(base: Float64Array, alt: Float64Array, baseline: Scenario, column: Float64Array): YearDifferences {
  const k = baseline.fit.states.length;
  const draws = column.length;
  const bands: YearDifferences['bands'][number][] = [];
  const odds: Odds[] = [];
  for (let s = 0; s < k; s++) {
    let more = 0; let tie = 0; let sum = 0;
    for (let d = 0; d < draws; d++) {
      const at = s * draws + d;
      const diff = alt[at]! - base[at]!;
      column[d] = diff;
      sum += diff;
      if (Math.abs(diff) <= TIE_TOLERANCE) tie += 1;
      else if (diff > 0) more += 1;
    }
    bands.push({ band: bandOf(column, baseline.level), mean: sum / draws });
    odds.push({ more: more / draws, tie: tie / draws, less: (draws - more - tie) / draws });
  }
  return { bands, odds };
}

function compareTo(baseline: Scenario, base: Simulation, alt: Simulation, result: ForecastResult,
  byYear: readonly YearDifferences[], horizon: YearDifferences | undefined): AlternativeComparison {
  const k = baseline.fit.states.length;
  const difference: ShareBands[] = [];
  const odds: Odds[][] = [];
  for (let s = 0; s < k; s++) {
    const bands = emptyBands();
    for (const year of byYear) appendBand(bands, year.bands[s]!.band, year.bands[s]!.mean);
    difference.push(bands);
    odds.push(byYear.map((year) => year.odds[s]!));
  }
  // The horizon is usually a shown year, whose differences were already made from the same mixes: taken as they are.
  const atHorizon = (horizon ?? differencesAt(base.horizonShares, alt.horizonShares, baseline, new Float64Array(base.tracks.draws)))
    .bands.map(({ band: { median, low, high } }) => ({ median, low, high }));
  return { result, difference, odds, dominance: baseline.target ? dominanceDifference(base, alt, baseline) : null, atHorizon };
}

function dominanceDifference(base: Simulation, alt: Simulation, baseline: Scenario): TargetComparison {
  const a = base.tracks.firstAtTarget;
  const b = alt.tracks.firstAtTarget;
  const draws = a.length;
  let sooner = 0; let same = 0; let later = 0; let onlyAlternative = 0; let onlyBaseline = 0; let neither = 0;
  const both: number[] = [];
  for (let d = 0; d < draws; d++) {
    const ta = a[d]!; const tb = b[d]!; // first step at the target, −1 when never within the horizon
    if (ta >= 0 && tb >= 0) {
      if (tb < ta) sooner += 1;
      else if (tb === ta) same += 1;
      else later += 1;
      both.push((tb - ta) * baseline.fit.step);
    } else if (tb >= 0) onlyAlternative += 1;
    else if (ta >= 0) onlyBaseline += 1;
    else neither += 1;
  }
  return {
    probabilityDifference: (onlyAlternative - onlyBaseline) / draws,
    outcomes: {
      sooner: sooner / draws, same: same / draws, later: later / draws,
      onlyAlternative: onlyAlternative / draws, onlyBaseline: onlyBaseline / draws, neither: neither / draws,
    },
    bothDraws: both.length,
    years: timingBand(Int32Array.from(both), baseline.level),
  };
}
