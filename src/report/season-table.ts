import type { ChalkInstance } from 'chalk';
import type { SeasonRun } from '../workspace/season.js';
import { count, levelLabel, percentBand, signed } from './numbers.js';
import { CAUTION, makeTable } from './style.js';

/** What `sere season` prints: where the record went, the horizon shares, and what changed. */
export function seasonTable(run: SeasonRun, recordPath: string, workspace: string, style: ChalkInstance): string {
  const { fit } = run;
  const lines: string[] = [];
  lines.push(style.bold(`${workspace}: season record written to ${recordPath}`));
  lines.push(`data: ${fit.input.file} · ${count(fit.sites.length, 'site')} · ${count(fit.transitions, 'transition')} · ` +
    `latest survey ${fit.latest.time} · sha256 ${fit.input.sha256.slice(0, 12)}…`);
  for (const { file, results } of run.forecasts) {
    lines.push(`scenario ${file}: seed ${run.seeds[file]}${results.length > 1 ? ` · ${results.length} alternatives, compared` : ''}`);
  }

  const all = run.forecasts.flatMap((f) => f.results);
  const level = all[0]?.scenario.level ?? 0.9;
  lines.push('', style.bold(`Share of the area at each scenario's horizon, % — median [${levelLabel(level)}]`));
  const t = makeTable(['scenario', 'year', ...fit.states], style, ['left', 'right', ...fit.states.map(() => 'right' as const)]);
  for (const r of all) {
    const last = r.years.length - 1;
    t.push([r.scenario.alternative ?? r.scenario.name, String(r.years[last]), ...fit.states.map((_, s) =>
      percentBand({ median: r.shares[s]!.median[last]!, low: r.shares[s]!.low[last]!, high: r.shares[s]!.high[last]! }))]);
  }
  lines.push(t.toString());

  const c = run.changes;
  if (!c) {
    lines.push('', style.dim('First record in this workspace: nothing earlier to compare with.'));
  } else {
    lines.push('', style.bold(`What changed since ${c.previous}`));
    lines.push(c.dataChanged
      ? `data changed: ${signed(c.transitions.now - c.transitions.before)} transitions, ${signed(c.sites.now - c.sites.before)} sites`
      : 'data unchanged (same SHA-256): any difference below comes from settings, scenarios or the tool version');
    const moved = c.forecasts.filter((f) => f.before.median !== f.now.median || f.before.low !== f.now.low || f.before.high !== f.now.high);
    if (moved.length === 0) {
      lines.push('forecasts: no horizon median or band moved');
    } else {
      const f = makeTable(['scenario', 'state', 'before', 'now', 'median moved'], style, ['left', 'left', 'right', 'right', 'right']);
      for (const m of moved) {
        f.push([m.scenario, m.state, `${percentBand(m.before)} (${m.before.year})`, `${percentBand(m.now)} (${m.now.year})`,
          `${signed(Math.round((m.now.median - m.before.median) * 1000) / 10)} pts`]);
      }
      lines.push(f.toString());
    }
    if (c.moved.length > 0) {
      const p = makeTable(['transition', 'before', 'now', 'new transitions out of its from-state'], style, ['left', 'right', 'right', 'right']);
      for (const m of c.moved) p.push([`${m.from} → ${m.to}`, m.before.toFixed(3), m.now.toFixed(3), signed(m.newTransitions)]);
      lines.push(style.dim('Fitted (MLE) probabilities that moved most:'), p.toString());
    }
  }
  if (run.scores.length > 0) {
    lines.push('', style.bold('Were earlier forecasts any good? (years now surveyed)'));
    const groups = new Map<string, typeof run.scores[number][]>();
    for (const sc of run.scores) {
      const key = `${sc.record}\u0000${sc.scenario}`;
      groups.set(key, [...(groups.get(key) ?? []), sc]);
    }
    const t = makeTable(['record', 'scenario', 'years', 'inside the band', 'log score', 'Brier score'], style,
      ['left', 'left', 'left', 'right', 'right', 'right']);
    for (const list of groups.values()) {
      const inside = list.reduce((a, x) => a + x.covered, 0);
      const total = list.reduce((a, x) => a + x.states, 0);
      const mean = (f: (x: typeof list[number]) => number): string => (list.reduce((a, x) => a + f(x), 0) / list.length).toFixed(3);
      t.push([list[0]!.record, list[0]!.scenario, list.map((x) => x.year).join(', '),
        `${inside} of ${total}${list[0]!.plotBands ? '' : ' (share bands)'}`, mean((x) => x.logScore), mean((x) => x.brierScore)]);
    }
    lines.push(t.toString());
    lines.push(style.dim('Only forecasts from the surveyed mix without treatments are scored; share bands leave out plot-level chance ' +
      '(add plots to a scenario for prediction bands). Scores: per site, lower is better (Gneiting & Raftery 2007).'));
  }
  lines.push('', style.dim(CAUTION));
  return lines.join('\n') + '\n';
}
