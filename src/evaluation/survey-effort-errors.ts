import type { Fit } from '../fit/fit.js';
import type { Scenario } from '../scenario/scenario.js';
import { checkScenarios } from '../engine/check-treatments.js';
import { simulate } from '../engine/simulate.js';
import type { AugmentSettings } from '../uncertainty/augment.js';
import { sampleLatent } from '../uncertainty/augment.js';
import { latentSampleOf, posteriorDraws } from '../uncertainty/posterior.js';
import type { RandomStream } from '../uncertainty/random.js';
import { errorTruth } from './error-truth.js';
import { currentRecords, futureRecords } from './future-records.js';
import { resurveyedSites } from './resurvey-choice.js';
import type { EffortCell, SurveyEffort } from './survey-effort.js';
import { changeError, meanWidths, replicateWidths } from './replicate-widths.js';

/**
 * The effort sampler's settings: 2 chains × (100 dropped + 100 kept). Each cell and replicate
 * reruns the sampler, so it runs far shorter than a fit's (augment.ts DEFAULT_AUGMENT, 4 × (500 +
 * 2 × 250)); its job is a band width averaged over replicates, where its Monte Carlo noise averages
 * out, not a band of its own. "Now" runs it too, so the comparison is like with like. `--chains`,
 * `--warm-up`, `--retained` and `--thin` on `sere effort` change it.
 */
export const EFFORT_SAMPLER: AugmentSettings = { chains: 2, warmUp: 100, retained: 200, thin: 1 };

export interface ErrorSurveyEffort extends SurveyEffort {
  /** The sampler rerun for "now" and for every cell and replicate. */
  readonly sampler: AugmentSettings;
}

/**
 * Survey effort for a chain fitted through an error table: the preposterior analysis of
 * survey-effort.ts (Raiffa & Schlaifer 1961) with the posterior the fit itself uses, that of the
 * observer-error sampler (augment-errors.ts). Replicate r's "truth" is a draw from the current
 * posterior of the chain, the error matrices and every site's true path (error-truth.ts: one
 * retained sweep of the fit's sampler, completed). Its future surveys are simulated as true
 * transitions and recorded through the truth's error matrices, appended to the sites' records as
 * new survey times (future-records.ts), and the sampler is rerun on the extended records — what
 * the practitioner would fit after those seasons — with the effort's settings (EFFORT_SAMPLER).
 * The horizon band is then remeasured from its draws of P.
 *
 * The band's start is the true mix at the latest survey time from the current posterior (the same
 * draws in "now" and every cell): the cells measure what the surveys teach about the chain. Future
 * surveys would sharpen where the landscape truly stands now as well, so in that part the widths
 * lean wide (conservative), more so with a noisier E: 1–3% wider than with the start known exactly
 * on a small invented case (test/slow/error-effort-start.test.ts), the exact widths in between. The rerun's sites are not carried to the
 * latest time (future-records.ts), and its P is drawn apart from this start, so a draw's P and
 * start are independent here, in "now" and the cells alike.
 *
 * "Now" reruns the same sampler on the records as they stand, on replicate r's sampler stream;
 * every cell's replicate r uses the same streams for the sampler, the band's draws and its start
 * (common random numbers, as survey-effort.ts), so a cell without surveys equals "now" exactly.
 */
export function errorSurveyEffort(scenario: Scenario, grid: { sites: readonly number[]; seasons: readonly number[] },
  options: { replicates: number; draws: number; random: RandomStream; sampler: AugmentSettings }): ErrorSurveyEffort {
  checkScenarios([scenario]);
  const { fit } = scenario;
  const model = fit.errorModel;
  const records = model?.records;
  if (!model || !records) throw new Error('internal: errorSurveyEffort needs a fit with observer error and its records');
  // Zoned fits with an error table are refused where the fit is made (fit-from-file.ts).
  if (scenario.zones) throw new Error('internal: errorSurveyEffort is not stratified by zone');
  const k = fit.states.length;
  const latent = latentSampleOf(fit, options.random)!;
  const now = currentRecords(records);
  // Replicate r's starts: the current posterior's true latest mix, one per band draw, shared by "now" and every cell.
  const starts = Array.from({ length: options.replicates }, (_, r) =>
    posteriorDraws(fit, options.draws, options.random.stream(`bands:${r}`).stream('starts'), latent).starts!);
  const widthsOf = (refit: Fit, r: number): number[] => {
    const random = options.random.stream(`bands:${r}`);
    const rerun = sampleLatent(refit, options.sampler, options.random.stream(`sampler:${r}`));
    const matrices = { ...posteriorDraws(refit, options.draws, random.stream('matrices'), rerun), starts: starts[r]! };
    const sim = simulate({ ...scenario, fit: { ...refit, latentSample: rerun }, plots: undefined }, matrices, random, { record: [scenario.horizonSteps] });
    return sim.shares.map((band) => band.high[0]! - band.low[0]!);
  };
  const withRecords = (extended: typeof records, added?: Float64Array): Fit => {
    const counts = Float64Array.from(fit.counts);
    if (added) for (let c = 0; c < counts.length; c++) counts[c] += added[c]!;
    return { ...fit, counts, errorModel: { ...model, records: extended } };
  };
  const nowRuns = replicateWidths(options.replicates, (r) => widthsOf(withRecords(now), r));
  const truths = Array.from({ length: options.replicates }, (_, r) => errorTruth(fit, latent, options.random.stream(`truth:${r}`)));
  const cells: EffortCell[] = [];
  for (const sites of grid.sites) {
    for (const seasons of grid.seasons) {
      const runs = replicateWidths(options.replicates, (r) => {
        const random = options.random.stream(`surveys:${sites}:${seasons}:${r}`);
        const chosen = seasons > 0 ? resurveyedSites(records, k, sites, random) : { patterns: [], newPlots: 0 };
        const future = futureRecords(records, truths[r]!, k, chosen, seasons, random);
        return widthsOf(withRecords(future.records, future.recordedPairs), r);
      });
      cells.push({ sites, seasons, widths: meanWidths(runs), changeError: changeError(runs, nowRuns) });
    }
  }
  return { current: meanWidths(nowRuns), cells, replicates: options.replicates, sampler: options.sampler };
}
