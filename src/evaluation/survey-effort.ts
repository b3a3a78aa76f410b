import type { Scenario } from '../scenario/scenario.js';
import { latentSampleOf, posteriorDraws } from '../uncertainty/posterior.js';
import type { RandomStream } from '../uncertainty/random.js';
import { simulate } from '../engine/simulate.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { resurveyedStates } from './resurvey-choice.js';
import { changeError, meanWidths, replicateWidths } from './replicate-widths.js';

export interface EffortCell {
  /** Sites surveyed each future season. */
  readonly sites: number;
  /** Future seasons of surveys. */
  readonly seasons: number;
  /** Per state: expected band width of the share at the horizon, after those surveys. */
  readonly widths: readonly number[];
  /** Per state: the Monte Carlo standard error of widths − current (paired over replicates; replicate-widths.ts); NaN with one replicate. */
  readonly changeError: readonly number[];
}

export interface SurveyEffort {
  /** Per state: the band width now. */
  readonly current: readonly number[];
  readonly cells: readonly EffortCell[];
  readonly replicates: number;
}

/**
 * Where survey effort narrows the bands: a preposterior analysis (Raiffa & Schlaifer 1961; for
 * monitoring design, e.g. Field et al. 2004). For each (sites per season, seasons) on the grid and
 * each replicate: draw a matrix from the current posterior as the "truth", simulate those future
 * surveys from it — a stratified random sample of the latest plots (resurvey-choice.ts), or all of
 * them and further plots from the latest mix — add their transitions to the counts, and measure the
 * horizon band of the scenario under the updated posterior. The mean width over replicates is what
 * that effort is expected to buy. Uses posterior draws whatever the scenario's source (more data
 * acts through the counts), and leaves year-to-year variation out: it does not shrink with more
 * surveys, and the widths measure the part that does.
 *
 * "Now" is measured the same way — the mean over the same number of replicates of bands from the
 * same number of draws — and replicate r's band draws, and its "truth", are common to "now" and
 * every cell (common random numbers; Law & Kelton, ch. 11). So a cell differs from "now" only by
 * the surveys added: with no sites it equals "now" exactly, and Monte Carlo noise in the band
 * cannot make a future look wider than today.
 *
 * A chain fitted through an error table is not handled here: its posterior comes from the
 * observer-error sampler, which added counts do not reach (survey-effort-errors.ts reruns it).
 */
export function surveyEffort(scenario: Scenario, grid: { sites: readonly number[]; seasons: readonly number[] },
  options: { replicates: number; draws: number; random: RandomStream }): SurveyEffort {
  checkScenarios([scenario]);
  const { fit } = scenario;
  const k = fit.states.length;
  // With gaps: one sampler run for the fit, reused with the added one-step surveys (an approximation:
  // new surveys would move the latent paths a little; rerunning the sampler per cell and replicate
  // would multiply the cost by their number).
  const latent = latentSampleOf(fit, options.random);
  const widthsOf = (counts: Float64Array, random: RandomStream): number[] => {
    const updated = { ...fit, counts };
    const matrices = posteriorDraws(updated, options.draws, random.stream('matrices'), latent);
    const sim = simulate({ ...scenario, fit: updated, plots: undefined }, matrices, random, { record: [scenario.horizonSteps] });
    return sim.shares.map((band) => band.high[0]! - band.low[0]!);
  };
  const now = replicateWidths(options.replicates, (r) => widthsOf(fit.counts, options.random.stream(`bands:${r}`)));
  const cells: EffortCell[] = [];
  for (const sites of grid.sites) {
    for (const seasons of grid.seasons) {
      const runs = replicateWidths(options.replicates, (r) => {
        const truth = posteriorDraws(fit, 1, options.random.stream(`truth:${r}`), latent).data;
        const random = options.random.stream(`surveys:${sites}:${seasons}:${r}`);
        const counts = Float64Array.from(fit.counts);
        simulateSurveys(truth, k, resurveyedStates(fit.latest.counts, sites, random), seasons, counts, random);
        return widthsOf(counts, options.random.stream(`bands:${r}`));
      });
      cells.push({ sites, seasons, widths: meanWidths(runs), changeError: changeError(runs, now) });
    }
  }
  return { current: meanWidths(now), cells, replicates: options.replicates };
}

/** Each site makes `seasons` transitions under `truth` (k×k at `at`); the transitions are added to `counts`. */
export function simulateSurveys(truth: Float64Array, k: number, states: number[], seasons: number, counts: Float64Array, random: RandomStream, at = 0): void {
  for (let s = 0; s < states.length; s++) {
    let state = states[s]!;
    for (let y = 0; y < seasons; y++) {
      let u = random.uniform();
      let next = 0;
      while (next < k - 1 && (u -= truth[at + state * k + next]!) >= 0) next += 1;
      counts[state * k + next] += 1;
      state = next;
    }
  }
}
