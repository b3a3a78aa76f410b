import type { SurveyRecord } from '../data/survey.js';
import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { discreteBandOf } from '../engine/quantiles.js';
import { climatologyForecast, persistenceForecast } from './baselines.js';
import { checkCoverage, type CoverageCheck } from './binomial-test.js';
import { covered, skill } from './scores.js';
import { siteCases } from './site-cases.js';
import { sitePredictive } from './site-predictive.js';
import { recordedPredictive } from './recorded-predictive.js';
import { matrixOfRecord, siteHistories, targetMatrices } from './site-histories.js';

/** Mean log score (nats) and mean Brier score per site; lower is better. */
export interface ScoreSet {
  readonly log: number;
  readonly brier: number;
}

/** One forecast scored site by site: from an origin, against the sites surveyed at a later time. */
export interface ScoredCase {
  /** Sites scored: surveyed at the scored time, with a survey at or before the origin. */
  readonly sites: number;
  /** Sites surveyed at the scored time that could not be scored (no survey by the origin). */
  readonly unscored: number;
  readonly chain: ScoreSet;
  readonly persistence: ScoreSet;
  readonly climatology: ScoreSet;
  /** Sites observed in each state, and the plot-count prediction band for them, in state order. */
  readonly observed: readonly number[];
  readonly low: readonly number[];
  readonly high: readonly number[];
  /** States whose observed count fell inside its band (ends included). */
  readonly covered: number;
  /**
   * Only with an error model: `recorded` — the chain's predictions went through the error matrix,
   * the scale of the records they are scored against (recorded-predictive.ts). Absent otherwise:
   * the records are taken as the truth.
   */
  readonly scale?: 'recorded';
}

export interface ScoreOrigin {
  readonly origin: number;
  readonly target: number;
  readonly step: number;
  /** Sites in each state surveyed at the origin: climatology, and the weight of persistence's smoothing. */
  readonly originCounts: readonly number[];
  readonly level: number;
  /**
   * With observer error (the draws carry error matrices): the mix of true states at a site's first
   * survey, π, which starts each site's forward filter (recorded-predictive.ts).
   */
  readonly initial?: ArrayLike<number>;
}

/** Log and Brier score of one categorical forecast p (k values from `offset`) for the observed state. */
function scoreOne(p: ArrayLike<number>, offset: number, k: number, observed: number): ScoreSet {
  let squares = 0;
  for (let j = 0; j < k; j++) squares += (p[offset + j]! - (j === observed ? 1 : 0)) ** 2;
  return { log: -Math.log(p[offset + observed]!), brier: squares };
}

/**
 * Score each surveyed site's state at `target` from its own last recorded state at or before
 * `origin`: the chain's posterior predictive probability (mean over the matrix draws of the row of
 * P^gap), beside persistence and climatology (baselines.ts), with log and Brier scores — strictly
 * proper (Gneiting & Raftery 2007) — and plot-count prediction bands for the same sites. With an
 * error model (the draws carry error matrices) the chain's side is on the recorded scale, filtered
 * over each site's whole record (recorded-predictive.ts); persistence and climatology are made of
 * records already. Null when no site can be scored.
 */
export function scoreSites(matrices: MatrixDraws, records: readonly SurveyRecord[], at: ScoreOrigin, random: RandomStream): ScoredCase | null {
  const k = matrices.k;
  let { cases, unscored } = siteCases(records, at.origin, at.target, at.step);
  let histories: (Int32Array | null)[] = [];
  // With one error matrix per observer each survey is read through its own observer's matrix.
  const matrixOf = matrixOfRecord(matrices.observerEmissions ? matrices.observers : undefined);
  if (matrices.emissions) {
    // With observer error each site is scored as recorded, from the filter over its whole record;
    // a site whose surveys are not whole steps apart cannot be filtered and is counted, not scored.
    if (!at.initial) throw new Error('internal: recorded-scale scores need the first-survey mix');
    histories = siteHistories(records, cases, at.origin, at.step, matrixOf);
    unscored += histories.filter((h) => h === null).length;
    cases = cases.filter((_, index) => histories[index] !== null);
    histories = histories.filter((h) => h !== null);
  }
  if (cases.length === 0) return null;
  const predictive = matrices.emissions
    ? recordedPredictive(matrices, cases, histories as Int32Array[], targetMatrices(records, cases, at.target, matrixOf), at.initial!, random)
    : sitePredictive(matrices, cases, random);
  const originSites = at.originCounts.reduce((a, b) => a + b, 0);
  const climatology = climatologyForecast(at.originCounts);
  const sum = { chain: { log: 0, brier: 0 }, persistence: { log: 0, brier: 0 }, climatology: { log: 0, brier: 0 } };
  const add = (into: { log: number; brier: number }, s: ScoreSet): void => { into.log += s.log; into.brier += s.brier; };
  const observed = new Array<number>(k).fill(0);
  cases.forEach((c, index) => {
    add(sum.chain, scoreOne(predictive.probabilities, index * k, k, c.to));
    add(sum.persistence, scoreOne(persistenceForecast(c.from, originSites, k), 0, k, c.to));
    add(sum.climatology, scoreOne(climatology, 0, k, c.to));
    observed[c.to]! += 1;
  });
  const mean = (s: { log: number; brier: number }): ScoreSet => ({ log: s.log / cases.length, brier: s.brier / cases.length });
  const D = predictive.draws;
  const low: number[] = [];
  const high: number[] = [];
  for (let s = 0; s < k; s++) {
    const band = discreteBandOf(predictive.counts.slice(s * D, (s + 1) * D), at.level);
    low.push(band.low);
    high.push(band.high);
  }
  return {
    sites: cases.length, unscored, chain: mean(sum.chain), persistence: mean(sum.persistence), climatology: mean(sum.climatology),
    observed, low, high, covered: covered(observed, low, high),
    ...(matrices.emissions ? { scale: 'recorded' as const } : {}),
  };
}

export interface ScoreSummary {
  readonly cases: number;
  readonly sites: number;
  readonly chain: ScoreSet;
  readonly persistence: ScoreSet;
  readonly climatology: ScoreSet;
  /** 1 − S / S_ref of the pooled mean scores (null when the reference scored 0). */
  readonly skill: {
    readonly log: { readonly persistence: number | null; readonly climatology: number | null };
    readonly brier: { readonly persistence: number | null; readonly climatology: number | null };
  };
  /** Bands that covered, of all (case, state) bands, with the exact binomial check against the level. */
  readonly coverage: CoverageCheck;
  /** `recorded` when the cases were scored through an error matrix (ScoredCase.scale); absent otherwise. */
  readonly scale?: 'recorded';
}

/**
 * Pool scored cases: mean scores over every scored site (each site-forecast weighs the same),
 * skill from those means (the ratio of means, not a mean of ratios), and coverage over all bands.
 */
export function summariseScores(list: readonly ScoredCase[], level: number): ScoreSummary {
  const sites = list.reduce((a, c) => a + c.sites, 0);
  const pooled = (f: (c: ScoredCase) => ScoreSet): ScoreSet => ({
    log: list.reduce((a, c) => a + f(c).log * c.sites, 0) / sites,
    brier: list.reduce((a, c) => a + f(c).brier * c.sites, 0) / sites,
  });
  const chain = pooled((c) => c.chain);
  const persistence = pooled((c) => c.persistence);
  const climatology = pooled((c) => c.climatology);
  const bands = list.reduce((a, c) => a + c.observed.length, 0);
  return {
    cases: list.length, sites, chain, persistence, climatology,
    skill: {
      log: { persistence: skill(chain.log, persistence.log), climatology: skill(chain.log, climatology.log) },
      brier: { persistence: skill(chain.brier, persistence.brier), climatology: skill(chain.brier, climatology.brier) },
    },
    coverage: checkCoverage(list.reduce((a, c) => a + c.covered, 0), bands, level),
    ...(list.some((c) => c.scale === 'recorded') ? { scale: 'recorded' as const } : {}),
  };
}
