import type { SurveyRecord } from '../data/survey.js';

/** One site to score: its last recorded state at or before the origin, and what was seen later. */
export interface SiteCase {
  readonly site: string;
  /** State index of the site's latest survey at or before the origin. */
  readonly from: number;
  /** Steps from that survey to the scored time. */
  readonly gap: number;
  /** State index observed at the scored time. */
  readonly to: number;
}

/**
 * The sites a forecast from `origin` is scored on at `target`: those surveyed at `target`, each
 * from its own latest survey at or before `origin` (a site missed at the origin is forecast from
 * the survey before, over more steps). Sites with no survey by the origin, or whose gap is not a
 * whole number of steps, cannot be scored from what the forecast knew and are counted, not scored.
 */
export function siteCases(records: readonly SurveyRecord[], origin: number, target: number, step: number):
  { cases: SiteCase[]; unscored: number } {
  const last = new Map<string, SurveyRecord>();
  const seen: SurveyRecord[] = [];
  for (const r of records) {
    if (r.time === target) seen.push(r);
    if (r.time <= origin) {
      const before = last.get(r.site);
      if (!before || r.time > before.time) last.set(r.site, r);
    }
  }
  // Code-point order of site ids, so results do not depend on the order of rows in the table.
  seen.sort((a, b) => (a.site < b.site ? -1 : a.site > b.site ? 1 : 0));
  const cases: SiteCase[] = [];
  let unscored = 0;
  for (const r of seen) {
    const from = last.get(r.site);
    const gap = from ? (target - from.time) / step : NaN;
    if (!from || !Number.isInteger(gap) || gap < 1) { unscored += 1; continue; }
    cases.push({ site: r.site, from: from.state, gap, to: r.state });
  }
  return { cases, unscored };
}
