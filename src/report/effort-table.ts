import type { ChalkInstance } from 'chalk';
import type { SurveyEffort } from '../evaluation/survey-effort.js';
import type { ZoneEffort } from '../evaluation/zone-effort.js';
import type { ErrorSurveyEffort } from '../evaluation/survey-effort-errors.js';
import type { Scenario } from '../scenario/scenario.js';
import { makeTable } from './style.js';

/** Band widths at the horizon on a grid of future survey effort. */
export function effortTable(scenario: Scenario, effort: SurveyEffort | ZoneEffort | ErrorSurveyEffort, style: ChalkInstance): string {
  const states = scenario.fit.states;
  const shown = scenario.target ? scenario.target.states : states.map((_, s) => s);
  const year = scenario.start.year + scenario.horizonSteps * scenario.fit.step;
  const seasons = [...new Set(effort.cells.map((c) => c.seasons))];
  const sites = [...new Set(effort.cells.map((c) => c.sites))];
  const lines = [style.bold(`Where to put survey effort — ${scenario.name}`),
    `width of the ${Math.round(scenario.level * 100)}% band of the share in ${year} without year-to-year variation, percentage points; ` +
    `mean of ${effort.replicates} simulated future${effort.replicates === 1 ? '' : 's'}`];
  // Each table's own Monte Carlo error: the largest standard error of a cell's change from "now" in it.
  const errorLine = (errors: (c: SurveyEffort['cells'][number]) => number): string | undefined => {
    let largest = -Infinity;
    for (const c of effort.cells) largest = Math.max(largest, errors(c));
    return Number.isFinite(largest) ? style.dim(`  Monte Carlo error: each change from "now" above is known to ±${(largest * 100).toFixed(1)} points at most (one standard error)`) : undefined;
  };
  for (const s of shown) {
    const t = makeTable([`${states[s]} — sites each season`, 'now', ...seasons.map((y) => `+${y} season${y === 1 ? '' : 's'}`)], style,
      ['left', 'right', ...seasons.map(() => 'right' as const)]);
    for (const n of sites) {
      t.push([String(n), (effort.current[s]! * 100).toFixed(1),
        ...seasons.map((y) => (effort.cells.find((c) => c.sites === n && c.seasons === y)!.widths[s]! * 100).toFixed(1))]);
    }
    lines.push(t.toString());
    const error = errorLine((c) => c.changeError[s]!);
    if (error) lines.push(error);
  }
  if ('names' in effort) {
    // Per zone: its own band (shares of the zone) with its part of the sites, split by area.
    lines.push(`by zone, sites split by area (${effort.names.map((n, z) => `${n} ${(effort.shares[z]! * 100).toFixed(0)}%`).join(', ')}); widths of each zone's own band`);
    effort.names.forEach((name, z) => {
      for (const s of shown) {
        const t = makeTable([`${name}: ${states[s]} — zone's sites each season`, 'now', ...seasons.map((y) => `+${y} season${y === 1 ? '' : 's'}`)], style,
          ['left', 'right', ...seasons.map(() => 'right' as const)]);
        for (const n of sites) {
          const cellOf = (y: number): ZoneEffort['cells'][number] => effort.cells.find((c) => c.sites === n && c.seasons === y)!;
          t.push([String(cellOf(seasons[0]!).zones[z]!.sites), (effort.currentZones[z]![s]! * 100).toFixed(1),
            ...seasons.map((y) => (cellOf(y).zones[z]!.widths[s]! * 100).toFixed(1))]);
        }
        lines.push(t.toString());
        const error = errorLine((c) => (c as ZoneEffort['cells'][number]).zones[z]!.changeError[s]!);
        if (error) lines.push(error);
      }
    });
  }
  if ('sampler' in effort) {
    const { chains, warmUp, retained, thin } = effort.sampler;
    lines.push(style.dim(`With the error table: future surveys recorded through the drawn error matrices; the sampler rerun for "now" and every cell and replicate ` +
      `(${chains} chains, ${warmUp} sweeps dropped, ${retained} kept, thin ${thin}); the start is today's true mix in every cell, so these widths lean wide.`));
  }
  lines.push(style.dim(effort.replicates > 1
    ? `Monte Carlo error under each table: the standard error of a cell's change from "now", paired over the ${effort.replicates} replicates; ` +
      'cells closer than about twice that are not told apart — raise --replicates to separate them.'
    : 'One replicate: its Monte Carlo error cannot be measured, and a cell can come out wider than "now" by chance — raise --replicates.'));
  lines.push(style.dim('Preposterior analysis: future surveys simulated from the current posterior, then refitted. ' +
    "Only the part of the band due to the fitted matrix shrinks; the scenario's events stay in it and do not shrink (plot counts and year-to-year variation are left out)."));
  return lines.join('\n') + '\n';
}
