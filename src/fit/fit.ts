import { SereError, quote, type Place } from '../errors.js';
import type { LabelMapUse, SurveyTable } from '../data/survey.js';
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
import { maxGap } from '../chain/bridges.js';
import { chooseBlocks, type SpatialBlocks } from './spatial-blocks.js';
import { stackedAssessment, type ErrorModel } from './error-model.js';
import { errorMaximumLikelihood, type ErrorEstimate } from '../chain/error-em.js';
import { posteriorMean } from '../chain/estimates.js';
import { errorModelOf } from './error-fit.js';
import type { FitZones } from './zones.js';

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
  /** Each site's position (x, y in projected units), aligned with `sites`, when the table had x and y columns. */
  readonly positions?: Float64Array;
  /**
   * The spatial block bootstrap's blocks (fit/spatial-blocks.ts), when sites have positions or the
   * fit came from a raster stack: the bootstrap then draws whole blocks, not sites.
   */
  readonly spatial?: SpatialBlocks;
  /**
   * A raster fit's blocks: `sites` then holds one entry per block (its pixels' transitions), and
   * `blockSites[b]` how many pixels (sites) block b stands for.
   */
  readonly blockSites?: Float64Array;
  /**
   * Observer error (`--errors`, `fit: { errors: … }`): the accuracy assessment and each site's
   * record. With it, `counts` are the recorded transitions (reported, not fitted): the chain is
   * fitted to the true paths behind the records (chain/error-em.ts, uncertainty/augment-errors.ts).
   */
  readonly errorModel?: ErrorModel;
  /**
   * The zones' own fits, when the fit was asked to keep them (`pooling: partial | none`; zones.ts).
   * Everything else in the record is the pooled fit of every zone together.
   */
  readonly zones?: FitZones;
}

/** What the checks of a fit's transitions need, from a survey table, a counts table or a raster stack. */
export interface CountedTransitions {
  readonly file: string;
  readonly states: readonly string[];
  readonly step: number;
  readonly mask: Uint8Array;
  readonly counts: Float64Array;
  readonly transitions: number;
  /** Pairs by gap in steps (gap 1: the one-step transitions): what --step should probably be. */
  readonly pairsByGap: readonly PairsByGap[];
  readonly gapCounts: readonly GapCell[];
  /** For each cell, the line of its first transition in `file` (0 when unknown). */
  readonly firstLine: Float64Array;
  /** For each cell of `gapCounts`, the line of the later survey of its first pair (absent: unknown). */
  readonly gapLines?: readonly number[];
  /**
   * With an error model a declared-impossible transition in the records is evidence of a
   * misclassification, not an error: those checks are left to the error model (error-fit.ts).
   */
  readonly errorModel?: boolean;
}

/**
 * The checks every fit's counts pass, whatever they were counted from: some transitions one step
 * apart, none declared impossible, every pair further apart explainable by allowed steps, and
 * every state free to go somewhere.
 */
export function checkTransitions(c: CountedTransitions): void {
  const k = c.states.length;
  if (c.transitions === 0) {
    // Pairs further apart alone speak of Pᵍ, whose g-th roots are many: the one-step chain is not identified.
    const guess = likelyStep(c.pairsByGap);
    if (!c.pairsByGap.some((s) => s.pairs > 0)) {
      throw new SereError('NO_TRANSITIONS', 'no site is surveyed twice: a transition needs the same site at two survey times', { file: c.file },
        'add the sites\' later surveys, with the same name in the site column each time');
    }
    throw new SereError('NO_TRANSITIONS',
      `no two surveys of the same site are ${c.step} time unit${c.step === 1 ? '' : 's'} apart`,
      { file: c.file },
      guess !== undefined
        ? `most surveys are ${guess * c.step} apart: try --step ${guess * c.step}`
        : 'each site needs at least two surveys one step apart');
  }
  for (let cell = 0; cell < k * k && !c.errorModel; cell++) {
    if (c.mask[cell] && c.counts[cell]! > 0) {
      const from = c.states[Math.floor(cell / k)];
      const to = c.states[cell % k];
      throw new SereError('IMPOSSIBLE_OBSERVED',
        `transition ${quote(`${from}>${to}`)} is declared impossible but observed ${c.counts[cell]} times (first ending here)`,
        { file: c.file, ...(c.firstLine[cell] ? { line: c.firstLine[cell] } : {}) },
        `check these surveys, drop ${quote(`${from}>${to}`)} from the impossible list, or, if observers may have mislabelled, give an error matrix (--errors)`);
    }
  }
  if (!c.errorModel) checkGapPairsPossible(c);
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
  checkTransitions({ file: table.file, states: table.states, step: settings.step, mask, ...counted, errorModel: settings.errors !== undefined });
  const errorModel = settings.errors === undefined ? undefined : errorModelOf(table, settings, mask);
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
    ...(table.labels ? { labels: table.labels } : {}),
    typos: likelyTypos(table),
    surveys: table.rows.count,
    firstTime,
    latest: latestSurveyedMix(table.rows, k, settings.step),
    triples: counted.triples,
    periods: counted.periods,
    groupColumn: settings.columns.group,
    ...(table.seasons ? { seasons: table.seasons } : {}),
    history: surveyedMixes(table.rows, k),
    ...(table.positions ? sitePlaces(table, k, settings) : {}),
    ...(errorModel ? { errorModel } : {}),
  };
}

/**
 * The positions of the fit's sites (those with surveys, in their order) and the blocks chosen from
 * each site's latest surveyed state — on a survey table, sites are seldom all surveyed in the latest
 * season, so each site's own latest state stands for the latest map.
 */
function sitePlaces(table: SurveyTable, k: number, settings: FitSettings): { positions: Float64Array; spatial?: SpatialBlocks } {
  const { rows } = table;
  const placed: number[] = [];
  const latest: number[] = [];
  for (let n = 0; n < rows.count; n++) {
    const s = rows.site[n]!;
    if (n === rows.count - 1 || rows.site[n + 1] !== s) {
      placed.push(table.positions![2 * s]!, table.positions![2 * s + 1]!);
      latest.push(rows.state[n]!);
    }
  }
  const positions = Float64Array.from(placed);
  const spatial = chooseBlocks(positions, latest, k, settings.blockSize, settings.places?.blockSize ?? { path: '--block-size' });
  return spatial ? { positions, spatial } : { positions };
}

/**
 * The fit with the spatial bootstrap's blocks of a given side (`uncertainty.block_size`): a new fit
 * object, the rest unchanged. Needs the sites' positions; a raster fit's blocks are counted with
 * the stack, so its side is set where the stack is counted (the same key, read before counting).
 */
export function withBlockSize(fit: Fit, side: number, place: Place): Fit {
  if (fit.blockSites) {
    if (fit.spatial?.side === side) return fit;
    throw new SereError('BAD_OPTION', `this raster fit was counted in blocks of ${fit.spatial?.side} pixels, not ${side}`, place,
      'give every scenario on this stack the same block_size, or refit the stack with sere fit --block-size');
  }
  if (!fit.positions) {
    throw new SereError('BAD_OPTION', 'a block size needs the sites\' positions, and this fit has none', place,
      'name the columns holding them (fit: { columns: { x: …, y: … } }, or --x-column and --y-column for sere fit), or drop block_size');
  }
  return { ...fit, spatial: chooseBlocks(fit.positions, [], fit.states.length, side, place)! };
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
 * A pair g steps apart from i to j needs some path of g allowed steps from i to j; under the
 * structural zeros there may be none, and then no matrix the fit may return explains the pair.
 * Reported like a one-step transition declared impossible, at the later survey's line.
 */
function checkGapPairsPossible({ gapCounts, gapLines, mask, states, file }: CountedTransitions): void {
  if (gapCounts.length === 0 || !mask.some((m) => m === 1)) return;
  const k = states.length;
  const lineOf = (c: number): number => gapLines?.[c] ?? 0;
  const reach = reachableInSteps(mask, k, maxGap(gapCounts));
  let worst = -1;
  gapCounts.forEach(([i, j, g], c) => {
    if (!reach[g]![i * k + j] && (worst < 0 || lineOf(c) < lineOf(worst))) worst = c;
  });
  if (worst < 0) return;
  const [i, j, g, n] = gapCounts[worst]!;
  const from = states[i]!;
  const to = states[j]!;
  throw new SereError('IMPOSSIBLE_OBSERVED',
    `${n} pair${n === 1 ? '' : 's'} of surveys ${g} steps apart go${n === 1 ? 'es' : ''} from ${quote(from)} to ${quote(to)}, ` +
    'which no path of allowed transitions does in that many steps (first ending here)',
    { file, ...(lineOf(worst) ? { line: lineOf(worst) } : {}) }, 'check these surveys, shorten the impossible list, or, if observers may have mislabelled, give an error matrix (--errors)');
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
  return cache.mle ??= errorMle(fit) ?? gapMaximumLikelihood(fit.counts, fit.gapCounts ?? [], fitPrior(fit), fit.states.length);
}

/**
 * With observer error: the MLE read from the fit file, or EM over the records (chain/error-em.ts),
 * started at the posterior mean of the recorded one-step counts on the allowed cells.
 */
function errorMle(fit: Fit): GapEstimate | undefined {
  const model = fit.errorModel;
  if (!model) return undefined;
  if (model.mle) return model.mle;
  if (!model.records) throw new Error('an error model without records or a stored MLE');
  const alpha = fitPrior(fit);
  const recorded = Float64Array.from(fit.counts, (n, c) => (alpha[c]! > 0 ? n : 0));
  return errorMaximumLikelihood(model.records, stackedAssessment(model), alpha, fit.states.length, posteriorMean(recorded, alpha, fit.states.length));
}

/**
 * With observer error, π — the mix of true states at sites' first surveys, at the MLE (EM's, or the
 * fit file's): what starts each site's forward filter when scoring on the recorded scale
 * (evaluation/recorded-predictive.ts). Undefined without an error model.
 */
export function firstSurveyMix(fit: Fit): Float64Array | undefined {
  return fit.errorModel ? (fitMle(fit) as ErrorEstimate).initial : undefined;
}

/** Whether the fit has pairs further apart than one step (then EM and data augmentation, not the closed form). */
export function hasGaps(fit: Fit): boolean {
  return (fit.gapCounts?.length ?? 0) > 0;
}

/** Whether the fit's posterior needs the data-augmentation sampler: pairs further apart than one step, or observer error. */
export function needsSampler(fit: Fit): boolean {
  return hasGaps(fit) || fit.errorModel !== undefined;
}
