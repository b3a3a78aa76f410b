import { SereError, quote, type Place } from '../errors.js';
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
  /** Every site's transitions, for the site bootstrap; empty when `pooledSites` is set. */
  readonly sites: SiteCountTable;
  /**
   * Set when the fit came from a counts table without per-site counts: how many sites it pooled.
   * Features that resample or replay sites then say so (`needPerSite`).
   */
  readonly pooledSites?: number;
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

/** What the checks of a fit's transitions need, from a survey table or a counts table. */
export interface CountedTransitions {
  readonly file: string;
  readonly states: readonly string[];
  readonly step: number;
  readonly mask: Uint8Array;
  readonly counts: Float64Array;
  readonly transitions: number;
  readonly skipped: readonly SkippedPairs[];
  /** For each cell, the line of its first transition in `file` (0 when unknown). */
  readonly firstLine: Float64Array;
}

/**
 * The checks every fit's one-step counts pass, whatever they were counted from: some transitions
 * one step apart, none declared impossible, and every state free to go somewhere.
 */
export function checkTransitions(c: CountedTransitions): void {
  const k = c.states.length;
  if (c.transitions === 0) {
    const guess = likelyStep(c.skipped);
    throw new SereError('NO_TRANSITIONS',
      `no two surveys of the same site are ${c.step} time unit${c.step === 1 ? '' : 's'} apart`,
      { file: c.file },
      guess !== undefined && guess !== c.step
        ? `most surveys are ${guess} apart: try --step ${guess}`
        : 'each site needs at least two surveys one step apart');
  }
  for (let cell = 0; cell < k * k; cell++) {
    if (c.mask[cell] && c.counts[cell]! > 0) {
      const from = c.states[Math.floor(cell / k)];
      const to = c.states[cell % k];
      throw new SereError('IMPOSSIBLE_OBSERVED',
        `transition ${quote(`${from}>${to}`)} is declared impossible but observed ${c.counts[cell]} times (first ending here)`,
        { file: c.file, ...(c.firstLine[cell] ? { line: c.firstLine[cell] } : {}) },
        `check these surveys, or drop ${quote(`${from}>${to}`)} from the impossible list`);
    }
  }
  for (let i = 0; i < k; i++) {
    let allowed = 0;
    for (let j = 0; j < k; j++) allowed += c.mask[i * k + j] ? 0 : 1;
    if (allowed === 0) {
      throw new SereError('ROW_ALL_IMPOSSIBLE', `every transition out of ${quote(c.states[i]!)} is declared impossible`,
        { path: 'impossible' }, `allow at least ${quote(`${c.states[i]}>${c.states[i]}`)} (staying put)`);
    }
  }
}

export function fitSurvey(table: SurveyTable, settings: FitSettings): Fit {
  const k = table.states.length;
  const mask = impossibleMask(settings.impossible, table.states, settings.places?.impossible ?? { path: '--impossible' });
  const counted = countTransitions(table, k, settings.step);
  checkTransitions({ file: table.file, states: table.states, step: settings.step, mask, ...counted });
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

/** How many sites a fit rests on, with or without their per-site counts. */
export function siteCount(fit: Fit): number {
  return fit.pooledSites ?? fit.sites.length;
}

/**
 * Refuse, in one line with the fix, a feature that needs each site's own counts (the site
 * bootstrap, a hindcast, scoring by site) when the fit pooled them away (a counts table counted
 * without --per-site).
 */
export function needPerSite(fit: Fit, feature: string, place: Place = { file: fit.input.file }): void {
  if (fit.pooledSites === undefined) return;
  throw new SereError('NO_SITE_COUNTS', `${feature} needs each site's counts, and this fit has only pooled counts`, place,
    'count again with sere count --per-site, or use the survey table itself');
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
