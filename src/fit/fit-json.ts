import { toRows } from '../chain/matrix.js';
import { pseudoCount } from '../chain/prior.js';
import { TOOL_VERSION } from '../version.js';
import { estimateFit, type FitEstimates } from './estimate.js';
import { zonesToJson } from './zones-json.js';
import { hasGaps, siteCount, type Fit } from './fit.js';
import type { LatentSample } from './latent-sample.js';
import { blocksJson } from './spatial-blocks.js';
import { errorModelJson, errorSweepsJson } from './error-model-json.js';

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
    input: fit.labels ? { ...fit.input, labels: { file: fit.labels.file, sha256: fit.labels.sha256 } } : fit.input,
    orientation: 'rows are from-states, columns are to-states',
    states: fit.states,
    step: fit.step,
    seasons: fit.seasons ? {
      centre: fit.seasons.centre, dates: fit.seasons.dates, other_year: fit.seasons.otherYear,
      largest_shift_days: fit.seasons.largestShiftDays, largest_shift_line: fit.seasons.largestShiftLine,
    } : null,
    prior: { name: typeof fit.prior === 'number' ? 'pseudo-count' : fit.prior, pseudo_count: pseudoCount(fit.prior) },
    impossible: fit.impossible,
    counts: toRows(fit.counts, k),
    probabilities: toRows(est.mle.p, k),
    estimation: {
      method: fit.errorModel ? 'em-observer-error' : hasGaps(fit) ? 'em' : 'closed-form',
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
      sites: siteCount(fit),
      surveys: fit.surveys,
      transitions: fit.transitions,
      skipped_pairs: fit.skipped,
      gap_counts: fit.gapCounts ?? [],
      pairs_by_gap: fit.pairsByGap ?? [{ gap: 1, pairs: fit.transitions }],
      single_survey_sites: fit.singleSurveySites ?? null,
      repeated_rows: fit.repeatedRows,
      ...(fit.labels ? { dropped_rows: fit.labels.droppedRows } : {}),
      first_time: fit.firstTime,
      last_time: fit.latest.time,
    },
    posterior_sampler: fit.latentSample ? samplerJson(fit, fit.latentSample) : null,
    // Only with observer error, so that fits without it keep their bytes.
    ...(fit.errorModel ? { error_model: errorModelJson(fit, est.mle) } : {}),
    latest: {
      time: fit.latest.time, counts: fit.latest.counts, shares: fit.latest.shares, sites: fit.latest.sites,
      carried: fit.latest.carried ?? [], not_carried: fit.latest.notCarried ?? 0,
    },
    group_column: fit.groupColumn ?? null,
    // null when the fit came from pooled counts (a counts table without per-site counts); a raster
    // fit counted in blocks holds each block's counts here (spatial_blocks.block_sites: its pixels).
    site_counts: fit.pooledSites === undefined || fit.blockSites ? fit.sites : null,
    site_gap_counts: siteGapJson(fit),
    // Only with positions or raster blocks, so a fit without them is written as before.
    ...(fit.positions ? { site_positions: fit.sites.ids.map((id, s) => [id, fit.positions![2 * s]!, fit.positions![2 * s + 1]!]) } : {}),
    ...(fit.spatial ? { spatial_blocks: spatialJson(fit) } : {}),
    period_counts: fit.periods ?? null,
    order2_counts: fit.triples ?? null,
    // Only in a zoned fit: every other fit file keeps its bytes.
    ...(fit.zones ? { zones: zonesToJson(fit, (zone) => fitToJson(zone, estimateFit(zone, est.posterior.level))) } : {}),
  };
}

/** The spatial bootstrap's blocks (spatial-blocks.ts, blocksJson); a raster fit's pixels per block. */
function spatialJson(fit: Fit): object {
  return { ...blocksJson(fit.spatial!, fit.blockSites !== undefined), ...(fit.blockSites ? { block_sites: Array.from(fit.blockSites) } : {}) };
}

/** The data-augmentation sampler's settings, diagnostics and retained latent counts (null where a cell never varies). */
function samplerJson(fit: Fit, s: LatentSample): object {
  const k = fit.states.length;
  const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);
  const values = (a: Float64Array): number[] => Array.from(a).filter(Number.isFinite);
  return {
    method: 'data augmentation (Rao-Blackwellised Dirichlet over retained completed counts)',
    seed: s.seed,
    chains: s.chains,
    warm_up: s.warmUp,
    thin: s.thin,
    retained: s.retained,
    rhat_max: values(s.rhat).length ? Math.max(...values(s.rhat)) : null,
    ess_min: values(s.ess).length ? Math.min(...values(s.ess)) : null,
    rhat: toRows(Array.from(s.rhat, finite), k),
    ess: toRows(Array.from(s.ess, finite), k),
    latent_counts: Array.from({ length: s.retained }, (_, r) => Array.from(s.latent.subarray(r * k * k, (r + 1) * k * k))),
    ...(s.errors ? errorSweepsJson(s, s.errors, k) : {}),
  };
}

/** Each site's pairs two or more steps apart, `[site, from, to, gap, n]`: what the site bootstrap resamples with gaps. */
function siteGapJson(fit: Fit): (readonly [string, number, number, number, number])[] {
  const table = fit.siteGaps;
  if (!table) return [];
  const k = fit.states.length;
  const out: (readonly [string, number, number, number, number])[] = [];
  for (let s = 0; s < table.length; s++) {
    for (let c = table.offsets[s]!; c < table.offsets[s + 1]!; c++) {
      const wide = table.cells[c]!;
      out.push([table.ids[s]!, Math.floor((wide % (k * k)) / k), wide % k, Math.floor(wide / (k * k)) + 2, table.counts[c]!]);
    }
  }
  return out;
}
