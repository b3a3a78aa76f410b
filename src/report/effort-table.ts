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
    `width of the ${Math.round(scenario.level * 100)}% band of the share in ${year}, percentage points; mean of ${effort.replicates} simulated futures`];
  for (const s of shown) {
    const t = makeTable([`${states[s]} — sites each season`, 'now', ...seasons.map((y) => `+${y} season${y === 1 ? '' : 's'}`)], style,
      ['left', 'right', ...seasons.map(() => 'right' as const)]);
    for (const n of sites) {
      t.push([String(n), (effort.current[s]! * 100).toFixed(1),
        ...seasons.map((y) => (effort.cells.find((c) => c.sites === n && c.seasons === y)!.widths[s]! * 100).toFixed(1))]);
    }
    lines.push(t.toString());
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
      }
    });
  }
  if ('sampler' in effort) {
    const { chains, warmUp, retained, thin } = effort.sampler;
    lines.push(style.dim(`With the error table: future surveys recorded through the drawn error matrices; the sampler rerun for "now" and every cell and replicate ` +
      `(${chains} chains, ${warmUp} sweeps dropped, ${retained} kept, thin ${thin}); the start is today's true mix in every cell, so these widths lean wide.`));
  }
  const largest = largestChangeError(effort, shown);
  if (largest !== null) {
    lines.push(style.dim(`Monte Carlo error: a cell's change from "now" is known to ±${(largest * 100).toFixed(1)} points at most (one standard error, ` +
      `paired over the ${effort.replicates} replicates); cells closer than about twice that are not told apart — raise --replicates to separate them.`));
  }
  lines.push(style.dim('Preposterior analysis: future surveys simulated from the current posterior, then refitted. ' +
    'Only the part of the band due to the fitted matrix shrinks; events and plot-level chance do not.'));
  return lines.join('\n') + '\n';
}

/** The largest standard error of a change from "now" among the shown states' cells (zones' own included); null with one replicate. */
function largestChangeError(effort: SurveyEffort | ZoneEffort | ErrorSurveyEffort, shown: readonly number[]): number | null {
  let largest = -Infinity;
  for (const c of effort.cells) {
    const parts = 'zones' in c ? [c.changeError, ...(c as ZoneEffort['cells'][number]).zones.map((p) => p.changeError)] : [c.changeError];
    for (const e of parts) for (const s of shown) if (e[s]! > largest) largest = e[s]!;
  }
  return largest === -Infinity || Number.isNaN(largest) ? null : largest;
}
