import type { SurveyRecord } from '../data/survey.js';
import type { SiteCase } from './site-cases.js';

/**
 * Each scored site's own record up to the origin, as the hidden-state model with observer error
 * reads it: pairs (steps after the site's first survey, recorded state), earliest first. With an
 * error model a site's last record alone does not say where it truly is — its whole record does
 * (the forward filter, recorded-predictive.ts). Null for a site whose surveys are not whole steps
 * apart: the filter cannot place them on the chain's steps, and the site is then not scored.
 */
export function siteHistories(records: readonly SurveyRecord[], cases: readonly SiteCase[], origin: number, step: number): (Int32Array | null)[] {
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
    const out = new Int32Array(2 * list.length);
    for (let n = 0; n < list.length; n++) {
      const at = (list[n]!.time - list[0]!.time) / step;
      if (!Number.isInteger(at)) return null;
      out[2 * n] = at;
      out[2 * n + 1] = list[n]!.state;
    }
    return out;
  });
}
