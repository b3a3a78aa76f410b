import { SereError, quote } from '../errors.js';
import type { SurveyTable } from '../data/survey.js';
import { countTransitions, likelyStep, type PeriodCounts, type SkippedPairs } from '../chain/counts.js';
import type { SiteCountTable } from '../chain/site-counts.js';
import { latestSurveyedMix, type SurveyedMix } from '../chain/latest-mix.js';
import { priorMatrix, type PriorSpec } from '../chain/prior.js';
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
  readonly repeatedRows: number;
  readonly surveys: number;
  readonly firstTime: number;
  readonly latest: SurveyedMix;
  /** Runs of three surveys one step apart, `[i, j, l, n]`: for the order tests (absent in old fit files). */
  readonly triples?: readonly (readonly [number, number, number, number])[];
  /** Transitions by the survey time they started: for time-homogeneity tests (absent in old fit files). */
  readonly periods?: readonly PeriodCounts[];
  /** The group column's name, when the survey table had one. */
  readonly groupColumn?: string;
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
    repeatedRows: table.repeatedRows,
    surveys: table.rows.count,
    firstTime,
    latest: latestSurveyedMix(table.rows, k),
    triples: counted.triples,
    periods: counted.periods,
    groupColumn: settings.columns.group,
  };
}

/** The Dirichlet prior parameters of a fit, structural zeros included. */
export function fitPrior(fit: Fit): Float64Array {
  const k = fit.states.length;
  return priorMatrix(k, fit.prior, impossibleMask(fit.impossible, fit.states, { path: 'impossible' }));
}
