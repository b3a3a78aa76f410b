import type { LandscapeTarget } from '../scenario/scenario.js';
import { stringify } from 'csv-stringify/sync';
import type { ForecastResult, ShareBands } from '../engine/forecast.js';
import type { Comparison } from '../engine/compare.js';

/** The one documented header (README, "Tidy CSV"); every CSV sere writes has exactly these columns. */
export const CSV_COLUMNS = ['scenario', 'alternative', 'state', 'year', 'measure', 'statistic', 'value', 'unit'] as const;

type Row = [scenario: string, alternative: string, state: string, year: number | '', measure: string, statistic: string, value: number | '', unit: string];

/** Shares, chances and differences in percent (or points) to 0.1: what a board report prints. */
const tenths = (fraction: number): number => Math.round(fraction * 1000) / 10;
/** Plot counts keep two decimals: their means are not whole numbers. */
const hundredths = (x: number): number => Math.round(x * 100) / 100;

const STATS = ['median', 'low', 'high', 'mean'] as const;

function bandRows(push: (row: Row) => void, who: [string, string], state: string, years: readonly number[],
  bands: ShareBands, measure: string, unit: string, value: (x: number) => number): void {
  years.forEach((year, t) => {
    for (const stat of STATS) push([...who, state, year, measure, stat, value(bands[stat][t]!), unit]);
  });
}

/** Rows of one forecast: shares (and plots) by year, and the landscape target's chance and timing. */
function forecastRows(r: ForecastResult, push: (row: Row) => void): void {
  const sc = r.scenario;
  const who: [string, string] = [sc.name, sc.alternative ?? ''];
  sc.fit.states.forEach((state, s) => {
    bandRows(push, who, state, r.years, r.shares[s]!, 'share', 'percent', tenths);
    // Counts as recorded are a measure of their own, so a reader never mixes them with true-state counts.
    if (r.plots) bandRows(push, who, state, r.years, r.plots[s]!, sc.plots?.scale === 'recorded' ? 'plots_recorded' : 'plots', 'plots', hundredths);
  });
  if (sc.target && r.dominance) {
    const state = targetStates(sc.target, sc.fit.states);
    const horizon = r.years[r.years.length - 1]!;
    push([...who, state, horizon, 'target_share', sc.target.bound === 'at-least' ? 'at_least' : 'at_most', tenths(sc.target.threshold), 'percent']);
    push([...who, state, horizon, 'target_chance', 'probability', tenths(r.dominance.probability), 'percent']);
    const y = r.dominance.year;
    for (const stat of ['median', 'low', 'high'] as const) push([...who, state, horizon, 'target_year', stat, y ? y[stat] : '', 'year']);
    push([...who, state, horizon, 'target_year', 'draws', r.dominance.draws, 'draws']);
    push([...who, state, horizon, 'target_already_met', 'flag', r.dominance.alreadyMet ? 1 : 0, 'flag']);
    // For a cap these are the questions that matter: does it still hold at the horizon, and throughout?
    push([...who, state, horizon, 'target_holds', 'at_horizon', tenths(r.dominance.holdsAtHorizon), 'percent']);
    push([...who, state, horizon, 'target_holds', 'every_year', tenths(r.dominance.holdsThroughout), 'percent']);
  }
}

/** Rows only a comparison has: differences from the baseline, chances of more, the target compared. */
function comparisonRows(c: Comparison, push: (row: Row) => void): void {
  const base = c.baseline;
  const sc = base.scenario;
  // Differences are kept at the shown years, in that order (engine/compare.ts).
  const shown = sc.showSteps.map((t) => base.years[base.steps.indexOf(t)]!);
  for (const alt of c.alternatives) {
    const who: [string, string] = [alt.result.scenario.name, alt.result.scenario.alternative ?? ''];
    sc.fit.states.forEach((state, s) => {
      shown.forEach((year, n) => {
        for (const stat of STATS) push([...who, state, year, 'difference', stat, tenths(alt.difference[s]![stat][n]!), 'points']);
        const odds = alt.odds[s]![n]!;
        push([...who, state, year, 'chance_more', 'probability', tenths(odds.more), 'percent']);
        push([...who, state, year, 'chance_tie', 'probability', tenths(odds.tie), 'percent']);
      });
    });
    const d = alt.dominance;
    if (d && sc.target) {
      const state = targetStates(sc.target, sc.fit.states);
      const horizon = base.years[base.years.length - 1]!;
      push([...who, state, horizon, 'target_chance_difference', 'difference', tenths(d.probabilityDifference), 'points']);
      const o = d.outcomes;
      const outcomes: [string, number][] = [['both_sooner', o.sooner], ['both_same', o.same], ['both_later', o.later],
        ['only_alternative', o.onlyAlternative], ['only_baseline', o.onlyBaseline], ['neither', o.neither]];
      for (const [name, x] of outcomes) push([...who, state, horizon, 'target_outcome', name, tenths(x), 'percent']);
      push([...who, state, horizon, 'target_both_draws', 'count', d.bothDraws, 'draws']);
      for (const stat of ['median', 'low', 'high'] as const) {
        push([...who, state, horizon, 'target_years_difference', stat, d.years ? d.years[stat] : '', 'years']);
      }
    }
  }
}

/**
 * The tidy CSV of a run, one row per scenario, alternative, state, year, measure and statistic
 * (README, "Tidy CSV"): the forecasts' shares, plots and target, then — when `comparison` is
 * given — each alternative's differences from the baseline, chances of more, and the target
 * compared. `sere forecast --csv`, `sere compare --csv` and season records all write through here.
 */
export function tidyCsv(results: readonly ForecastResult[], comparison?: Comparison): string {
  const rows: Row[] = [];
  const push = (row: Row): void => { rows.push(row); };
  for (const r of results) forecastRows(r, push);
  if (comparison) comparisonRows(comparison, push);
  return stringify(rows, { header: true, columns: [...CSV_COLUMNS] });
}

/** A target's states as one CSV cell: the state, or a set joined with '+' (its shares are summed). */
function targetStates(target: LandscapeTarget, states: readonly string[]): string {
  return target.states.map((s) => states[s]!).join('+');
}
