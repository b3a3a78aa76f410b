import { SereError, quote } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import type { SeasonRounding } from '../data/seasons.js';

export type { SeasonRounding };
import { likelyTypos, type LikelyTypo } from '../data/label-typos.js';
import { countTransitions, likelyStep, type GapCell, type PairsByGap, type PeriodCounts, type SkippedPairs } from '../chain/counts.js';
import type { SiteCountTable } from '../chain/site-counts.js';
import { latestSurveyedMix, surveyedMixes, type MixAtTime, type SurveyedMix } from '../chain/latest-mix.js';
import { priorMatrix, type PriorSpec } from '../chain/prior.js';
import { gapMaximumLikelihood, type GapEstimate } from '../chain/gap-em.js';
import { reachableInSteps } from '../chain/reachable.js';
import { impossibleMask, type FitSettings } from './settings.js';
import type { LatentSample } from './latent-sample.js';

/**
 * A fitted chain as sere keeps it: the counts (the sufficient statistic) and what is needed to
 * redo every estimate — the prior, the structural zeros, the per-site counts for the bootstrap,
 * the latest surveyed mix, and where the data came from.
 */
export interface Fit {
  readonly input: { readonly file: string; readonly sha256: string };
  readonly states: readonly string[];
  /** Time units one step spans. */
  readonly step: number;
  readonly prior: PriorSpec;
  readonly impossible: readonly (readonly [string, string])[];
  /** Row-major k×k pooled counts, row = from. */
  readonly counts: Float64Array;
  readonly sites: SiteCountTable;
  readonly transitions: number;
  /** Pairs not used, by gap in time units: only in fit files written before gaps were modelled (new fits use every pair). */
  readonly skipped: readonly SkippedPairs[];
  /** Pairs two or more whole steps apart, by gap in steps (chain/counts.ts GapCell; absent in old fit files). */
  readonly gapCounts?: readonly GapCell[];
  /** Every pair used, by gap in steps (absent in old fit files: then the one-step transitions only). */
  readonly pairsByGap?: readonly PairsByGap[];
  /** Sites surveyed once only, which say nothing about change (absent in old fit files). */
  readonly singleSurveySites?: number;
  /**
   * Each site's pairs two or more steps apart, aligned with `sites` (cells (g − 2)·k² + i·k + j;
   * chain/counts.ts), for the site bootstrap of a fit with gaps (absent in old fit files).
   */
  readonly siteGaps?: SiteCountTable;
  readonly repeatedRows: number;
  /** Rare labels that look like slips for common ones (a warning; not kept in fit files). */
  readonly typos?: readonly LikelyTypo[];
  readonly surveys: number;
  readonly firstTime: number;
  readonly latest: SurveyedMix;
  /** Runs of three surveys one step apart, `[i, j, l, n]`: for the order tests (absent in old fit files). */
  readonly triples?: readonly (readonly [number, number, number, number])[];
  /** Transitions by the survey time they started: for time-homogeneity tests (absent in old fit files). */
  readonly periods?: readonly PeriodCounts[];
  /** When the time column held dates: how they were rounded to yearly seasons (data/seasons.ts). */
  readonly seasons?: SeasonRounding;
  /** The group column's name, when the survey table had one. */
  readonly groupColumn?: string;
  /**
   * The data-augmentation sampler's retained latent counts, when the fit has pairs further apart
   * than one step and was sampled at fit time (`sere fit`) or read from a fit file that holds them.
   * Without it, the posterior runs the sampler on the run's own random stream.
   */
  readonly latentSample?: LatentSample;
  /** The surveyed mix at every survey time, for charts (absent when fitted from a fit file). */
  readonly history?: readonly MixAtTime[];
}

export function fitSurvey(table: SurveyTable, settings: FitSettings): Fit {
  const k = table.states.length;
  const mask = impossibleMask(settings.impossible, table.states, settings.places?.impossible ?? { path: '--impossible' });
  const counted = countTransitions(table, k, settings.step);
  if (counted.transitions === 0) {
    // Pairs further apart alone speak of Pᵍ, whose g-th roots are many: the one-step chain is not identified.
    const guess = likelyStep(counted.pairsByGap);
    throw new SereError('NO_TRANSITIONS',
      `no two surveys of the same site are ${settings.step} time unit${settings.step === 1 ? '' : 's'} apart`,
      { file: table.file },
      guess !== undefined
        ? `most surveys are ${guess * settings.step} apart: try --step ${guess * settings.step}`
        : 'each site needs at least two surveys one step apart');
  }
  for (let c = 0; c < k * k; c++) {
    if (mask[c] && counted.counts[c]! > 0) {
      const from = table.states[Math.floor(c / k)];
      const to = table.states[c % k];
      throw new SereError('IMPOSSIBLE_OBSERVED',
        `transition ${quote(`${from}>${to}`)} is declared impossible but observed ${counted.counts[c]} times (first ending here)`,
        { file: table.file, line: counted.firstLine[c] }, `check these surveys, or drop ${quote(`${from}>${to}`)} from the impossible list`);
    }
  }
  checkGapPairsPossible(counted.gapCounts, counted.gapLines, mask, table);
  for (let i = 0; i < k; i++) {
    let allowed = 0;
    for (let j = 0; j < k; j++) allowed += mask[i * k + j] ? 0 : 1;
    if (allowed === 0) {
      throw new SereError('ROW_ALL_IMPOSSIBLE', `every transition out of ${quote(table.states[i]!)} is declared impossible`,
        { path: 'impossible' }, `allow at least ${quote(`${table.states[i]}>${table.states[i]}`)} (staying put)`);
    }
  }
  let firstTime = Infinity;
  for (let n = 0; n < table.rows.count; n++) firstTime = Math.min(firstTime, table.rows.time[n]!);
  return {
    input: { file: table.file, sha256: table.sha256 },
    states: table.states,
    step: settings.step,
    prior: settings.prior,
    impossible: settings.impossible,
    counts: counted.counts,
    sites: counted.sites,
    transitions: counted.transitions,
    skipped: [],
    gapCounts: counted.gapCounts,
    pairsByGap: counted.pairsByGap,
    singleSurveySites: counted.singleSurveySites,
    siteGaps: counted.siteGaps,
    repeatedRows: table.repeatedRows,
    typos: likelyTypos(table),
    surveys: table.rows.count,
    firstTime,
    latest: latestSurveyedMix(table.rows, k, settings.step),
    triples: counted.triples,
    periods: counted.periods,
    groupColumn: settings.columns.group,
    ...(table.seasons ? { seasons: table.seasons } : {}),
    history: surveyedMixes(table.rows, k),
  };
}

/**
 * A pair g steps apart from i to j needs some path of g allowed steps from i to j; under the
 * structural zeros there may be none, and then no matrix the fit may return explains the pair.
 * Reported like a one-step transition declared impossible, at the later survey's line.
 */
function checkGapPairsPossible(gapCounts: readonly GapCell[], gapLines: readonly number[], mask: Uint8Array, table: SurveyTable): void {
  if (gapCounts.length === 0 || !mask.some((m) => m === 1)) return;
  const k = table.states.length;
  const reach = reachableInSteps(mask, k, gapCounts.reduce((g, c) => Math.max(g, c[2]), 0));
  let worst = -1;
  gapCounts.forEach(([i, j, g], c) => {
    if (!reach[g]![i * k + j] && (worst < 0 || gapLines[c]! < gapLines[worst]!)) worst = c;
  });
  if (worst < 0) return;
  const [i, j, g, n] = gapCounts[worst]!;
  const from = table.states[i]!;
  const to = table.states[j]!;
  throw new SereError('IMPOSSIBLE_OBSERVED',
    `${n} pair${n === 1 ? '' : 's'} of surveys ${g} steps apart go${n === 1 ? 'es' : ''} from ${quote(from)} to ${quote(to)}, ` +
    'which no path of allowed transitions does in that many steps (first ending here)',
    { file: table.file, line: gapLines[worst] }, 'check these surveys, or shorten the impossible list');
}

/**
 * What every stage asks of a fit — its structural zeros, prior and maximum-likelihood matrix —
 * worked out once per fit and kept (a fit is never changed after it is made; a changed copy is a
 * new object and gets its own). One owner, so the mask and the MLE cannot be built two ways.
 */
const derived = new WeakMap<Fit, { mask?: Uint8Array; prior?: Float64Array; mle?: GapEstimate }>();
function cacheOf(fit: Fit): { mask?: Uint8Array; prior?: Float64Array; mle?: GapEstimate } {
  let entry = derived.get(fit);
  if (!entry) derived.set(fit, entry = {});
  return entry;
}

/** Read-only (shared by every caller): the fit's structural zeros as a k×k mask (its impossible pairs name its own states, checked when it was made). */
export function fitMask(fit: Fit): Uint8Array {
  const cache = cacheOf(fit);
  return cache.mask ??= impossibleMask(fit.impossible, fit.states, { path: 'impossible' });
}

/**
 * The Dirichlet prior parameters of a fit, structural zeros included: a fresh copy each call,
 * since callers add counts to it in place (the posterior parameters).
 */
export function fitPrior(fit: Fit): Float64Array {
  const cache = cacheOf(fit);
  return Float64Array.from(cache.prior ??= priorMatrix(fit.states.length, fit.prior, fitMask(fit)));
}

/**
 * Read-only (shared by every caller): the maximum-likelihood matrix of a fit (a row never observed
 * takes the prior mean; see estimates.ts). From one-step counts alone it is the closed form; with
 * pairs further apart, EM over the bridges between surveys (chain/gap-em.ts).
 */
export function fitMle(fit: Fit): GapEstimate {
  const cache = cacheOf(fit);
  return cache.mle ??= gapMaximumLikelihood(fit.counts, fit.gapCounts ?? [], fitPrior(fit), fit.states.length);
}

/** Whether the fit has pairs further apart than one step (then EM and data augmentation, not the closed form). */
export function hasGaps(fit: Fit): boolean {
  return (fit.gapCounts?.length ?? 0) > 0;
}
