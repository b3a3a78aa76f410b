import type { ChalkInstance } from 'chalk';
import type { HindcastCase, HindcastSummary } from '../evaluation/hindcast.js';
import { makeTable } from './style.js';
import { coverageWords, recordedScaleNote, SCORE_HEADINGS, SCORE_NOTE, scoreRows } from './score-words.js';

/** Hindcast skill by horizon: per-site scores against persistence and climatology, and band coverage. */
export function hindcastTable(file: string, summary: readonly HindcastSummary[], cases: readonly HindcastCase[], level: number, step: number, style: ChalkInstance, errors?: string): string {
  const lines = [style.bold(`Hindcast of ${file}: fit on the surveys up to T − h, forecast each site surveyed at T, compare with what was seen`)];
  if (errors !== undefined) lines.push(recordedScaleNote(errors));
  const t = makeTable(['years ahead', 'forecasts', 'sites', ...SCORE_HEADINGS], style,
    ['right', 'right', 'right', 'left', ...SCORE_HEADINGS.slice(1).map(() => 'right' as const)]);
  for (const s of summary) {
    const [log, brier] = scoreRows(s);
    t.push([String(s.steps * step), String(s.cases), String(s.sites), ...log], ['', '', '', ...brier]);
  }
  lines.push(t.toString());
  lines.push(style.dim(SCORE_NOTE));
  lines.push('', style.bold('Plot-count prediction bands for the sites surveyed at T, against what was seen'));
  for (const s of summary) {
    const words = `${s.steps * step} ${s.steps * step === 1 ? 'year' : 'years'} ahead: ${coverageWords(s.coverage)}`;
    lines.push(s.coverage.flag ? style.yellow(words) : words);
  }
  lines.push(style.dim(`${cases.length} forecasts from ${new Set(cases.map((c) => c.origin)).size} starting surveys; ` +
    `the check treats each (forecast, state) band as an independent trial, which states of one survey are not, so p is a guide (level ${level}).`));
  return lines.join('\n') + '\n';
}
