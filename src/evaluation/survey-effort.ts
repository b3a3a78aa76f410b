import type { Scenario } from '../scenario/scenario.js';
import { posteriorDraws } from '../uncertainty/posterior.js';
import { multinomialSampler } from '../uncertainty/multinomial.js';
import type { RandomStream } from '../uncertainty/random.js';
import { simulate } from '../engine/simulate.js';
import { columnStart } from '../engine/layout.js';
import { bandOf } from '../engine/quantiles.js';

export interface EffortCell {
  /** Sites surveyed each future season. */
  readonly sites: number;
  /** Future seasons of surveys. */
  readonly seasons: number;
  /** Per state: expected band width of the share at the horizon, after those surveys. */
  readonly widths: readonly number[];
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
 * surveys from it — the latest surveyed plots first, further plots starting from the latest mix —
 * add their transitions to the counts, and measure the horizon band of the scenario under the
 * updated posterior. The mean width over replicates is what that effort is expected to buy.
 * Uses posterior draws whatever the scenario's source (more data acts through the counts).
 */
export function surveyEffort(scenario: Scenario, grid: { sites: readonly number[]; seasons: readonly number[] },
  options: { replicates: number; draws: number; random: RandomStream }): SurveyEffort {
  const { fit } = scenario;
  const k = fit.states.length;
  const widthsOf = (counts: Float64Array, random: RandomStream): number[] => {
    const updated = { ...fit, counts };
    const matrices = posteriorDraws(updated, options.draws, random.stream('matrices'));
    const sim = simulate({ ...scenario, fit: updated, plots: undefined }, matrices, random, {}, undefined, [scenario.horizonSteps]);
    return Array.from({ length: k }, (_, s) => {
      const from = columnStart(sim.paths, 0, s);
      const band = bandOf(sim.paths.shares.slice(from, from + sim.paths.draws), scenario.level);
      return band.high - band.low;
    });
  };
  const current = widthsOf(fit.counts, options.random.stream('current'));
  const cells: EffortCell[] = [];
  for (const sites of grid.sites) {
    for (const seasons of grid.seasons) {
      const sum = new Array<number>(k).fill(0);
      for (let r = 0; r < options.replicates; r++) {
        const random = options.random.stream(`effort:${sites}:${seasons}:${r}`);
        const truth = posteriorDraws(fit, 1, random).data;
        const counts = Float64Array.from(fit.counts);
        simulateSurveys(truth, k, startingStates(fit.latest.counts, sites, random), seasons, counts, random);
        widthsOf(counts, random.stream('bands')).forEach((w, s) => { sum[s]! += w; });
      }
      cells.push({ sites, seasons, widths: sum.map((x) => x / options.replicates) });
    }
  }
  return { current, cells, replicates: options.replicates };
}

/** States of the sites surveyed next: the latest surveyed plots first, then new plots from the latest mix. */
function startingStates(latest: readonly number[], sites: number, random: RandomStream): number[] {
  const states: number[] = [];
  latest.forEach((n, s) => { for (let i = 0; i < n; i++) states.push(s); });
  const kept = states.slice(0, sites);
  const total = states.length;
  const share = Float64Array.from(latest, (n) => n / total);
  const extra = new Int32Array(latest.length);
  if (sites > kept.length) multinomialSampler(random)(sites - kept.length, share, 0, latest.length, extra, 0);
  extra.forEach((n, s) => { for (let i = 0; i < n; i++) kept.push(s); });
  return kept;
}

/** Each site makes `seasons` transitions under `truth`; the transitions are added to `counts`. */
function simulateSurveys(truth: Float64Array, k: number, states: number[], seasons: number, counts: Float64Array, random: RandomStream): void {
  for (let s = 0; s < states.length; s++) {
    let state = states[s]!;
    for (let y = 0; y < seasons; y++) {
      let u = random.uniform();
      let next = 0;
      while (next < k - 1 && (u -= truth[state * k + next]!) >= 0) next += 1;
      counts[state * k + next] += 1;
      state = next;
    }
  }
}
