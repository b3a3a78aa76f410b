import type { SurveyRecord } from '../data/survey.js';
import { firstSurveyMix, type Fit } from '../fit/fit.js';
import { posteriorDraws } from '../uncertainty/posterior.js';
import { drawZoneMatrices } from '../uncertainty/zone-draws.js';
import { zoneView } from '../engine/scenario-draws.js';
import type { RandomStream } from '../uncertainty/random.js';
import { scoreSites, summariseScores, type ScoredCase, type ScoreSummary } from '../evaluation/site-scores.js';

/** Draws of an earlier record's posterior redrawn to score it, and the level of its coverage bands. */
export const SCORE_DRAWS = 1000;
export const SCORE_LEVEL = 0.9;

/** A stored forecast as far as scoring needs it (read back from a record's JSON). */
export interface ScorableForecast {
  readonly name: string;
  readonly start: { readonly year: number; readonly from: string };
  readonly treatments: readonly unknown[];
  readonly events: readonly unknown[];
}

/** What a later season needs of an earlier record to score it: its fitted chain and its forecasts. */
export interface ScorableRecord {
  readonly name: string;
  /** The record's fit.json, loaded and checked as a fit file. */
  readonly chain: Fit;
  readonly forecasts: readonly ScorableForecast[];
}

export interface RecordScore extends ScoredCase {
  readonly record: string;
  /** The record's latest survey time: the origin its sites are forecast from. */
  readonly origin: number;
  readonly year: number;
  /** For a zoned record: the zone whose sites these are, scored with that zone's chain. */
  readonly zone?: string;
}

export interface RecordScores {
  readonly record: string;
  /** The record's scenarios that forecast exactly this chain: from the surveyed mix, no treatments, no events. */
  readonly scenarios: readonly string[];
  readonly years: readonly RecordScore[];
  readonly summary: ScoreSummary;
  /** For a zoned record: each zone's summary (the landscape's is `summary`). */
  readonly zones?: readonly { readonly zone: string; readonly summary: ScoreSummary }[];
}

/**
 * Score an earlier record against the surveys made since: every site surveyed in a later year,
 * from its own last survey at or before the record's latest time, with the record's own chain —
 * its posterior (fitted counts and prior, kept in fit.json) redrawn from a stream named after the
 * record — beside persistence and climatology (evaluation/site-scores.ts). A forecast JSON holds
 * bands of the landscape mix, not draws; redrawing from the counts gives the same posterior
 * without storing thousands of matrices. Sites in a state the record did not know are not scored
 * (counted as unscored). Null when no later survey can be scored yet.
 */
export function scoreRecord(record: ScorableRecord, current: { readonly states: readonly string[]; readonly records: readonly SurveyRecord[] },
  random: RandomStream): RecordScores | null {
  const { chain } = record;
  const index = new Map(chain.states.map((s, i) => [s, i]));
  const toChain = current.states.map((s) => index.get(s));
  const known: SurveyRecord[] = [];
  const unknownAt = new Map<number, number>();
  for (const r of current.records) {
    const state = toChain[r.state];
    if (state === undefined) unknownAt.set(r.time, (unknownAt.get(r.time) ?? 0) + 1);
    else known.push({ ...r, state });
  }
  const origin = chain.latest.time;
  const years = [...new Set(current.records.map((r) => r.time))].filter((t) => t > origin).sort((a, b) => a - b);
  if (years.length === 0) return null;
  const own = random.stream(`score:${record.name}`);
  const scenarios = record.forecasts.filter((f) => f.start.from === 'latest' && f.treatments.length === 0 && f.events.length === 0).map((f) => f.name);
  if (chain.zones) return scoreZones(record.name, chain, known, years, unknownAt, scenarios, own);
  const draws = posteriorDraws(chain, SCORE_DRAWS, own.stream('matrices'));
  // With an error table the record's fit.json keeps the sampler's sweeps (each with its error
  // matrix): the sites are scored as recorded, each filtered from the first-survey mix π it fitted.
  const pi = firstSurveyMix(chain);
  const initial = pi ? { initial: pi } : {};
  const scored: RecordScore[] = [];
  for (const year of years) {
    const s = scoreSites(draws, known, { origin, target: year, step: chain.step, originCounts: chain.latest.counts, level: SCORE_LEVEL, ...initial },
      own.stream(`sites:${year}`));
    if (s) scored.push({ record: record.name, origin, year, ...s, unscored: s.unscored + (unknownAt.get(year) ?? 0) });
  }
  if (scored.length === 0) return null;
  return { record: record.name, scenarios, years: scored, summary: summariseScores(scored, SCORE_LEVEL) };
}

/**
 * A zoned record (pooling partial or none) is scored as it forecast: each site with its own zone's
 * chain — zone z's posterior draws as the stratified forecast draws them (drawZoneMatrices: for
 * partial pooling every zone's row from Dirichlet(κp + n_z) within each draw of the shared κ and p),
 * climatology being the zone's mix at the origin. The landscape summary adds every zone's sites up
 * (scores are per-site means, weighted by sites; coverage counts every zone's bands). Sites in a
 * zone the record did not have, or with no zone, are counted as unscored.
 */
function scoreZones(name: string, chain: Fit, known: readonly SurveyRecord[], years: readonly number[], unknownAt: Map<number, number>,
  scenarios: readonly string[], own: RandomStream): RecordScores | null {
  const zones = chain.zones!.zones;
  const draws = drawZoneMatrices(chain, 'posterior', SCORE_DRAWS, own.stream('matrices'));
  const origin = chain.latest.time;
  const outside = new Map<number, number>();
  for (const r of known) {
    if (r.time > origin && !zones.some((z) => z.name === r.group)) outside.set(r.time, (outside.get(r.time) ?? 0) + 1);
  }
  const scored: RecordScore[] = [];
  const byZone = zones.map((zone, z) => {
    const inZone = known.filter((r) => r.group === zone.name);
    const list: RecordScore[] = [];
    for (const year of years) {
      const s = scoreSites(zoneView(draws, z), inZone, { origin, target: year, step: chain.step, originCounts: zone.fit.latest.counts, level: SCORE_LEVEL },
        own.stream(`sites:${year}:zone:${zone.name}`));
      if (s) list.push({ record: name, origin, year, zone: zone.name, ...s });
    }
    return { zone: zone.name, list };
  });
  for (const year of years) {
    const inYear = byZone.flatMap((b) => b.list.filter((s) => s.year === year));
    // The year's sites that no zone could score are added to its first scored zone's unscored count.
    if (inYear.length > 0) inYear[0] = { ...inYear[0]!, unscored: inYear[0]!.unscored + (unknownAt.get(year) ?? 0) + (outside.get(year) ?? 0) };
    scored.push(...inYear);
  }
  if (scored.length === 0) return null;
  return {
    record: name, scenarios, years: scored, summary: summariseScores(scored, SCORE_LEVEL),
    zones: byZone.filter((b) => b.list.length > 0).map((b) => ({ zone: b.zone, summary: summariseScores(b.list, SCORE_LEVEL) })),
  };
}
