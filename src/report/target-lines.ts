import type { ChalkInstance } from 'chalk';
import type { FirstTime, ForecastResult } from '../engine/forecast.js';
import type { Band } from '../engine/quantiles.js';
import type { LandscapeTarget } from '../scenario/scenario.js';
import { percent, wholeBand } from './numbers.js';

/** "high-marsh covering at least 40% of the whole area", "pioneer + mudflat covering at most 30% …, for 5 consecutive years". */
export function targetLabel(target: LandscapeTarget, states: readonly string[], step: number): string {
  const names = target.states.map((s) => states[s]).join(' + ');
  const bound = target.bound === 'at-least' ? 'at least' : 'at most';
  const years = target.staysMet * step;
  return `${names} covering ${bound} ${percent(target.threshold)}% of the whole area` +
    (target.staysMet > 1 ? `, for ${years} consecutive years` : '');
}

/**
 * A timing band with the number of draws it rests on: "2050 [2035–2072] (n = 240)"; "too few
 * draws reach it: n = 2" below MIN_BAND_DRAWS; "—" when no draw does. `format` prints a band.
 */
export function timingCell(band: Band | null, draws: number, format: (b: Band) => string = wholeBand, which = 'draws reach it'): string {
  if (draws === 0) return '—';
  return band ? `${format(band)} (n = ${draws})` : `too few ${which}: n = ${draws}`;
}

/** The landscape target block of `sere forecast`'s table. */
export function targetLines(r: ForecastResult, style: ChalkInstance): string[] {
  const sc = r.scenario;
  const target = sc.target!;
  const t = r.dominance!;
  const last = r.years[r.years.length - 1];
  const lines = [style.bold(`Landscape target: ${targetLabel(target, sc.fit.states, sc.fit.step)}`)];
  const holds = `chance it holds in ${last}: ${percent(t.holdsAtHorizon)}%; in every year ${sc.start.year}–${last}: ${percent(t.holdsThroughout)}%`;
  if (t.alreadyMet) lines.push(`  already met in ${sc.start.year}; ${holds.replace('chance it holds', 'chance it still holds')}`);
  if (!t.alreadyMet || target.staysMet > 1) {
    const reach = target.staysMet > 1 ? `chance it holds ${target.staysMet * sc.fit.step} consecutive years, starting by ${last - (target.staysMet - 1) * sc.fit.step}` : `chance it is reached by ${last}`;
    lines.push(`  ${reach}: ${percent(t.probability)}%`);
    lines.push(t.draws === 0 ? '  reached in no draw within the horizon'
      : `  first year${t.year ? ', among draws that reach it' : ''}: ${timingCell(t.year, t.draws)}`);
  }
  if (!t.alreadyMet) lines.push(`  ${holds}`);
  if (t.shortAtHorizon > 0) {
    lines.push(style.dim(`  ${t.shortAtHorizon} of ${r.draws} draws meet it in ${last} but for fewer than ${target.staysMet * sc.fit.step} years: ` +
      'not counted as reaching it (the forecast cannot see whether it lasts)'));
  }
  lines.push(style.dim('  (a share of the whole landscape, not the time for any one site to change)'));
  return lines;
}

/** A first-time cell for a table: the band with its draw count (see timingCell). */
export function firstTimeCell(f: FirstTime): string {
  return timingCell(f.year, f.draws);
}
