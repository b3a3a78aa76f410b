import type { ChalkInstance } from 'chalk';
import type { ForecastResult } from '../engine/forecast.js';
import { levelLabel, percentBand } from './numbers.js';
import { makeTable } from './style.js';

/** How the treated long-run mix is labelled everywhere, so it is never read as the fitted chain's. */
export function treatedStationaryTitle(year: number, level: number): string {
  return `Long-run mix if the treatments acting in ${year} went on for ever, % — median [${levelLabel(level)}] over draws`;
}

export const TREATED_STATIONARY_NOTE = 'Each piece of land keeps the matrix it has in that year (treated or not) and settles to its ' +
  'long-run mix; the landscape mix is their area-weighted sum. Events are left out. This is not the fitted chain\'s long-run mix.';

/** The block of `sere forecast`'s table; nothing when no treatment acts in the horizon year. */
export function treatedStationaryLines(r: ForecastResult, style: ChalkInstance): string[] {
  const t = r.treatedStationary;
  if (!t) return [];
  const sc = r.scenario;
  const names = t.treatments.map((n) => sc.treatments[n]!.name).join(', ');
  const lines = [style.bold(treatedStationaryTitle(t.year, sc.level)), `treatments: ${names}`];
  if (t.bands) {
    const table = makeTable(['state', 'treated long-run share', 'fitted chain (above)'], style, ['left', 'right', 'right']);
    sc.fit.states.forEach((name, s) => table.push([name, percentBand(t.bands![s]!), r.stationary.bands ? percentBand(r.stationary.bands[s]!) : '—']));
    lines.push(table.toString());
  } else {
    lines.push(style.yellow('withheld: in every draw some land has more than one closed class under its treated matrix'));
  }
  if (t.bands && t.notUnique > 0) {
    lines.push(style.yellow(`${t.notUnique} of ${r.draws} draws have more than one closed class on some land and are left out.`));
  }
  lines.push(style.dim(TREATED_STATIONARY_NOTE));
  return lines;
}
