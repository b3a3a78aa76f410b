import type { ChalkInstance } from 'chalk';
import type { HindcastCase, HindcastSummary } from '../evaluation/hindcast.js';
import { percent } from './numbers.js';
import { makeTable } from './style.js';

/** Hindcast skill by horizon: coverage of the bands and proper scores against persistence. */
export function hindcastTable(file: string, summary: readonly HindcastSummary[], cases: readonly HindcastCase[], level: number, step: number, style: ChalkInstance): string {
  const lines = [style.bold(`Hindcast of ${file}: fit on the surveys up to T − h, forecast T, compare with what was seen`)];
  const t = makeTable(['years ahead', 'forecasts', `inside the ${percent(level)}% band`, 'log score', 'persistence', 'Brier score', 'persistence'], style,
    ['right', 'right', 'right', 'right', 'right', 'right', 'right']);
  for (const s of summary) {
    t.push([String(s.steps * step), String(s.cases), `${percent(s.coverage)}%`, s.logScore.toFixed(3), s.persistenceLogScore.toFixed(3),
      s.brierScore.toFixed(3), s.persistenceBrierScore.toFixed(3)]);
  }
  lines.push(t.toString());
  lines.push(style.dim(`Coverage near ${percent(level)}% means the bands are honest; scores are per surveyed site, lower is better ` +
    '(Gneiting & Raftery 2007), beside "nothing changes" (persistence of the starting mix).'));
  lines.push(style.dim(`${cases.length} forecasts from ${new Set(cases.map((c) => c.origin)).size} starting surveys.`));
  return lines.join('\n') + '\n';
}
