import { siteCount } from '../fit/fit.js';
import type { ChalkInstance } from 'chalk';
import type { SeasonRun } from '../workspace/season.js';
import { count, levelLabel, percentBand, signed } from './numbers.js';
import { CAUTION, makeTable } from './style.js';
import { dataWarnings } from './fit-table.js';
import { zonesLine } from './forecast-table.js';
import { coverageWords, SCORE_HEADINGS, SCORE_NOTE, scoreRows } from './score-words.js';

/** What `sere season` prints: where the record went, the horizon shares, and what changed. */
export function seasonTable(run: SeasonRun, recordPath: string, workspace: string, style: ChalkInstance): string {
  const { fit } = run;
  const lines: string[] = [];
  lines.push(style.bold(`${workspace}: season record written to ${recordPath}`));
  lines.push(`data: ${fit.input.file} · ${count(siteCount(fit), 'site')} · ${count(fit.transitions, 'transition')} · ` +
    `latest survey ${fit.latest.time} · sha256 ${fit.input.sha256.slice(0, 12)}…`);
  lines.push(...dataWarnings(fit, style));
  for (const { file, results } of run.forecasts) {
    const varying = results.some((r) => r.variation) ? ' · year-to-year variation' : '';
    lines.push(`scenario ${file}: seed ${run.seeds[file]}${results.length > 1 ? ` · ${results.length} alternatives, compared` : ''}${varying}`);
    if (results[0]?.scenario.zones) lines.push(`  ${zonesLine(results[0].scenario, false)}`);
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
  const zoned = all.filter((r) => r.zones);
  if (zoned.length > 0) {
    lines.push('', style.bold(`Each zone at the horizon, % of the zone — median [${levelLabel(level)}]`));
    const z = makeTable(['scenario', 'zone', 'year', ...fit.states], style, ['left', 'left', 'right', ...fit.states.map(() => 'right' as const)]);
    for (const r of zoned) {
      const last = r.years.length - 1;
      for (const zone of r.zones!) {
        z.push([r.scenario.alternative ?? r.scenario.name, zone.name, String(r.years[last]), ...fit.states.map((_, s) =>
          percentBand({ median: zone.shares[s]!.median[last]!, low: zone.shares[s]!.low[last]!, high: zone.shares[s]!.high[last]! }))]);
      }
    }
    lines.push(z.toString());
  }

  const c = run.changes;
  if (!c) {
    lines.push('', style.dim('First record in this workspace: nothing earlier to compare with.'));
  } else {
    lines.push('', style.bold(`What changed since ${c.previous}`));
    lines.push(c.dataChanged
      ? `data changed: ${signed(c.transitions.now - c.transitions.before)} transitions, ${c.sites.now === c.sites.before ? 'no new sites' : `${signed(c.sites.now - c.sites.before)} sites`}`
      : 'data unchanged (same SHA-256): any difference below comes from settings, scenarios or the tool version');
    if (c.error_table) {
      const e = c.error_table;
      lines.push(!e.changed ? 'error table unchanged (same SHA-256)'
        : e.before === null ? 'error table added: the chain is now fitted to the true states behind the records'
          : e.now === null ? 'error table removed: the records are now taken as the truth'
            : 'error table changed (new SHA-256): the fit moves with the new accuracy assessment as well as with any new surveys');
      if (e.now !== null) lines.push(style.dim('with an error table each draw starts from its own true mix, so the move is not split into new data and moving the start'));
    }
    const moved = c.forecasts.filter((f) => f.before.median !== f.now.median || f.before.low !== f.now.low || f.before.high !== f.now.high);
    if (moved.length === 0) {
      lines.push('forecasts: no median or band moved in the years both records forecast');
    } else {
      const pts = (x: number | null): string => (x === null ? '—' : `${signed(Math.round(x * 1000) / 10)} pts`);
      const f = makeTable(['scenario', 'state', 'year', 'before', 'now', 'new data', 'moving the start'], style,
        ['left', 'left', 'right', 'right', 'right', 'right', 'right']);
      for (const m of moved) f.push([m.scenario, m.state, String(m.year), percentBand(m.before), percentBand(m.now), pts(m.effects.data), pts(m.effects.start)]);
      lines.push(style.dim('Share of the area in the same year in both records, % — median [band]; the median\'s move split into the effect ' +
        'of the new data (new fit from the previous start) and of moving the start to the latest survey (same draws):'));
      lines.push(f.toString());
    }
    if (c.moved.length > 0) {
      const p = makeTable(['transition', 'before', 'now', 'new transitions out of its from-state'], style, ['left', 'right', 'right', 'right']);
      for (const m of c.moved) p.push([`${m.from} → ${m.to}`, m.before.toFixed(3), m.now.toFixed(3), signed(m.newTransitions)]);
      lines.push(style.dim('Fitted (MLE) probabilities that moved most:'), p.toString());
    }
  }
  if (run.scores.length > 0) {
    lines.push('', style.bold('Were earlier forecasts any good? Sites surveyed since, each from its own last state'));
    const t = makeTable(['record', 'years', 'sites', ...SCORE_HEADINGS], style,
      ['left', 'left', 'right', 'left', ...SCORE_HEADINGS.slice(1).map(() => 'right' as const)]);
    for (const r of run.scores) {
      const [log, brier] = scoreRows(r.summary);
      t.push([r.record, [...new Set(r.years.map((y) => y.year))].join(', '), String(r.summary.sites), ...log], ['', '', '', ...brier]);
      for (const z of r.zones ?? []) {
        const [zlog, zbrier] = scoreRows(z.summary);
        t.push([`  zone ${z.zone}`, '', String(z.summary.sites), ...zlog], ['', '', '', ...zbrier]);
      }
    }
    lines.push(t.toString());
    for (const r of run.scores) {
      const words = `${r.record}: plot-count prediction bands for the sites surveyed: ${coverageWords(r.summary.coverage)}`;
      lines.push(r.summary.coverage.flag ? style.yellow(words) : words);
      if (r.summary.scale === 'recorded') lines.push(style.dim('  scored on the recorded scale: each site filtered over its record, carried forward and recorded through the record\'s error matrices'));
      const unscored = r.years.reduce((a, y) => a + y.unscored, 0);
      if (unscored > 0) lines.push(style.dim(`  ${count(unscored, 'site')} surveyed since could not be scored (not surveyed by ${r.years[0]!.origin}, or in a state the record did not know)`));
      lines.push(style.dim(`  ${r.scenarios.length > 0 ? `forecast by: ${r.scenarios.join('; ')}` : 'no scenario of this record forecasts the chain alone (all have a given start, treatments or events)'}`));
    }
    lines.push(style.dim(SCORE_NOTE + ' The record\'s chain is scored (its posterior redrawn from fit.json): scenarios with treatments or events are not.' +
      (run.scores.some((r) => r.zones) ? ' A record by zone: each site by its zone\'s chain, climatology the zone\'s mix.' : '')));
  }
  lines.push('', style.dim(CAUTION));
  return lines.join('\n') + '\n';
}
