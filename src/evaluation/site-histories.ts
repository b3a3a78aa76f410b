import type { SurveyRecord } from '../data/survey.js';
import type { SiteCase } from './site-cases.js';

/**
 * Which error matrix a survey is read through (fit/error-model.ts): with one matrix per observer,
 * 1 + o for assessed observer o of `observers`; 0, the pooled matrix, for anyone else, an unnamed
 * observer, or when there is one shared matrix (`observers` absent).
 */
export function matrixOfRecord(observers: readonly string[] | undefined): (r: SurveyRecord) => number {
  if (!observers) return () => 0;
  const index = new Map(observers.map((name, o) => [name, 1 + o] as const));
  return (r) => (r.observer === undefined ? 0 : index.get(r.observer) ?? 0);
}

/**
 * Each scored site's own record up to the origin, as the hidden-state model with observer error
 * reads it: triples (steps after the site's first survey, recorded state, error matrix of the
 * survey — matrixOfRecord), earliest first. With an error model a site's last record alone does
 * not say where it truly is — its whole record does (the forward filter, recorded-predictive.ts).
 * Null for a site whose surveys are not whole steps apart: the filter cannot place them on the
 * chain's steps, and the site is then not scored.
 */
export function siteHistories(records: readonly SurveyRecord[], cases: readonly SiteCase[], origin: number, step: number,
  matrixOf: (r: SurveyRecord) => number = () => 0): (Int32Array | null)[] {
  const wanted = new Set(cases.map((c) => c.site));
  const bySite = new Map<string, SurveyRecord[]>();
  for (const r of records) {
    if (r.time > origin || !wanted.has(r.site)) continue;
    const list = bySite.get(r.site);
    if (list) list.push(r);
    else bySite.set(r.site, [r]);
  }
  return cases.map((c) => {
    const list = bySite.get(c.site)!.sort((a, b) => a.time - b.time);
    const out = new Int32Array(3 * list.length);
    for (let n = 0; n < list.length; n++) {
      const at = (list[n]!.time - list[0]!.time) / step;
      if (!Number.isInteger(at)) return null;
      out[3 * n] = at;
      out[3 * n + 1] = list[n]!.state;
      out[3 * n + 2] = matrixOf(list[n]!);
    }
    return out;
  });
}

/**
 * The error matrix of each case's scored survey (the one at `target`): known, it is the survey
 * being scored, so its forecast is recorded through that survey's own observer's matrix.
 */
export function targetMatrices(records: readonly SurveyRecord[], cases: readonly SiteCase[], target: number,
  matrixOf: (r: SurveyRecord) => number): Int32Array {
  const bySite = new Map<string, number>();
  for (const r of records) if (r.time === target) bySite.set(r.site, matrixOf(r));
  return Int32Array.from(cases, (c) => bySite.get(c.site)!);
}
