import { toRows } from '../chain/matrix.js';
import { pseudoCount } from '../chain/prior.js';
import { TOOL_VERSION } from '../version.js';
import type { FitEstimates } from './estimate.js';
import { hasGaps, type Fit } from './fit.js';

/**
 * The fit as JSON — both `sere fit --out` and `sere fit --json` write this. Every matrix is an
 * array of rows in state order, row = from state, column = to state. Documented in the README;
 * `format_version` changes when a key changes meaning.
 */
export function fitToJson(fit: Fit, est: FitEstimates): object {
  const k = fit.states.length;
  const label = (i: number): string => fit.states[i]!;
  return {
    format: 'sere-fit',
    format_version: 1,
    tool_version: TOOL_VERSION,
    input: fit.input,
    orientation: 'rows are from-states, columns are to-states',
    states: fit.states,
    step: fit.step,
    prior: { name: typeof fit.prior === 'number' ? 'pseudo-count' : fit.prior, pseudo_count: pseudoCount(fit.prior) },
    impossible: fit.impossible,
    counts: toRows(fit.counts, k),
    probabilities: toRows(est.mle.p, k),
    estimation: {
      method: hasGaps(fit) ? 'em' : 'closed-form',
      iterations: est.mle.iterations,
      converged: est.mle.converged,
      log_likelihood: est.mle.logLikelihood,
      expected_counts: toRows(est.mle.expected, k),
    },
    posterior: {
      level: est.posterior.level,
      mean: toRows(est.posterior.mean, k),
      low: toRows(est.posterior.low, k),
      high: toRows(est.posterior.high, k),
    },
    stationary: est.stationary.unique ? Array.from(est.stationary.mix) : null,
    closed_classes: est.stationary.unique ? null : est.stationary.closedClasses.map((c) => c.map(label)),
    flags: {
      rows_from_prior: est.mle.rowsFromPrior.map(label),
      rows_never_left: est.mle.rowsNeverLeft.map(label),
    },
    data: {
      sites: fit.sites.length,
      surveys: fit.surveys,
      transitions: fit.transitions,
      skipped_pairs: fit.skipped,
      gap_counts: fit.gapCounts ?? [],
      pairs_by_gap: fit.pairsByGap ?? [{ gap: 1, pairs: fit.transitions }],
      single_survey_sites: fit.singleSurveySites ?? null,
      repeated_rows: fit.repeatedRows,
      first_time: fit.firstTime,
      last_time: fit.latest.time,
    },
    latest: fit.latest,
    group_column: fit.groupColumn ?? null,
    site_counts: fit.sites,
    period_counts: fit.periods ?? null,
    order2_counts: fit.triples ?? null,
  };
}
