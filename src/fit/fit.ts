import { SereError, quote } from '../errors.js';
import type { LabelMapUse, SurveyTable } from '../data/survey.js';
import { likelyTypos, type LikelyTypo } from '../data/label-typos.js';
import { countTransitions, likelyStep, type GapCell, type PeriodCounts, type SkippedPairs } from '../chain/counts.js';
import type { SiteCountTable } from '../chain/site-counts.js';
import { latestSurveyedMix, surveyedMixes, type MixAtTime, type SurveyedMix } from '../chain/latest-mix.js';
import { priorMatrix, type PriorSpec } from '../chain/prior.js';
import { maximumLikelihood, type PointEstimate } from '../chain/estimates.js';
import { impossibleMask, type FitSettings } from './settings.js';

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
  readonly skipped: readonly SkippedPairs[];
  /** Pairs two or more whole steps apart, by gap in steps (chain/counts.ts GapCell; absent in old fit files). */
  readonly gapCounts?: readonly GapCell[];
  readonly repeatedRows: number;
  /** The label map the survey labels went through, and the surveys it left out (absent without one). */
  readonly labels?: LabelMapUse;
  /** Rare labels that look like slips for common ones (a warning; not kept in fit files). */
  readonly typos?: readonly LikelyTypo[];
  readonly surveys: number;
  readonly firstTime: number;
  readonly latest: SurveyedMix;
  /** Runs of three surveys one step apart, `[i, j, l, n]`: for the order tests (absent in old fit files). */
  readonly triples?: readonly (readonly [number, number, number, number])[];
  /** Transitions by the survey time they started: for time-homogeneity tests (absent in old fit files). */
  readonly periods?: readonly PeriodCounts[];
  /** The group column's name, when the survey table had one. */
  readonly groupColumn?: string;
  /** The surveyed mix at every survey time, for charts (absent when fitted from a fit file). */
  readonly history?: readonly MixAtTime[];
}

export function fitSurvey(table: SurveyTable, settings: FitSettings): Fit {
  const k = table.states.length;
  const mask = impossibleMask(settings.impossible, table.states, settings.places?.impossible ?? { path: '--impossible' });
  const counted = countTransitions(table, k, settings.step);
  if (counted.transitions === 0) {
    const guess = likelyStep(counted.skipped);
    throw new SereError('NO_TRANSITIONS',
      `no two surveys of the same site are ${settings.step} time unit${settings.step === 1 ? '' : 's'} apart`,
      { file: table.file },
      guess !== undefined && guess !== settings.step
        ? `most surveys are ${guess} apart: try --step ${guess}`
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
    skipped: counted.skipped,
    gapCounts: counted.gapCounts,
    repeatedRows: table.repeatedRows,
    ...(table.labels ? { labels: table.labels } : {}),
    typos: likelyTypos(table),
    surveys: table.rows.count,
    firstTime,
    latest: latestSurveyedMix(table.rows, k),
    triples: counted.triples,
    periods: counted.periods,
    groupColumn: settings.columns.group,
    history: surveyedMixes(table.rows, k),
  };
}

/**
 * What every stage asks of a fit — its structural zeros, prior and maximum-likelihood matrix —
 * worked out once per fit and kept (a fit is never changed after it is made; a changed copy is a
 * new object and gets its own). One owner, so the mask and the MLE cannot be built two ways.
 */
const derived = new WeakMap<Fit, { mask?: Uint8Array; prior?: Float64Array; mle?: PointEstimate }>();
function cacheOf(fit: Fit): { mask?: Uint8Array; prior?: Float64Array; mle?: PointEstimate } {
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

/** Read-only (shared by every caller): the maximum-likelihood matrix of a fit (a row never observed takes the prior mean; see estimates.ts). */
export function fitMle(fit: Fit): PointEstimate {
  const cache = cacheOf(fit);
  return cache.mle ??= maximumLikelihood(fit.counts, fitPrior(fit), fit.states.length);
}
