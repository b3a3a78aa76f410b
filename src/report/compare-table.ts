import type { ChalkInstance } from 'chalk';
import type { Comparison } from '../engine/compare.js';
import { levelLabel, percent, percentBand, signed } from './numbers.js';
import { firstTimeCell, targetLabel, timingCell } from './target-lines.js';
import type { ForecastResult } from '../engine/forecast.js';
import { TREATED_STATIONARY_NOTE, treatedStationaryTitle } from './treated-stationary-lines.js';
import { CAUTION, makeTable } from './style.js';
import type { Scenario } from '../scenario/scenario.js';
import { zonesLine } from './forecast-table.js';

const label = (s: Scenario): string => s.alternative ?? s.name;

/** Side-by-side terminal tables of alternatives against the baseline. */
export function comparisonTable(c: Comparison, style: ChalkInstance): string {
  const base = c.baseline;
  const sc = base.scenario;
  const states = sc.fit.states;
  const band = levelLabel(sc.level);
  // Positions of the shown steps among the steps summarised (the horizon may be there too).
  const shown = sc.showSteps.map((t) => base.steps.indexOf(t));
  const years = shown.map((t) => String(base.years[t]));
  const all = [base, ...c.alternatives.map((a) => a.result)];
  const lines: string[] = [];
  lines.push(style.bold(`Comparison of ${all.length} alternatives — baseline: ${sc.name}`));
  lines.push(`data: ${sc.fit.input.file} · uncertainty: ${sc.source} · ${base.draws} draws · seed ${base.seed} · bands ${band}`);
  if (sc.zones) lines.push(zonesLine(sc));
  lines.push('Every alternative runs on the same matrix draws and event years (common random numbers).');
  for (const r of all) for (const note of r.notes) lines.push(style.yellow(`note (${r.scenario.name}): ${note}`));

  lines.push('', style.bold(`Share of the area by year, % — median [${band}]`));
  const shares = makeTable(['state / alternative', ...years], style, ['left', ...shown.map(() => 'right' as const)]);
  states.forEach((name, s) => {
    shares.push([style.bold(name), ...shown.map(() => '')]);
    for (const r of all) {
      const b = r.shares[s]!;
      shares.push([`  ${label(r.scenario)}`, ...shown.map((t) => percentBand({ median: b.median[t]!, low: b.low[t]!, high: b.high[t]! }))]);
    }
  });
  lines.push(shares.toString());

  lines.push('', style.bold(`Difference from the baseline, percentage points — median [${band}] (chance it gives more; of a tie, when any draw ties)`));
  const diffs = makeTable(['state / alternative', ...years.slice(1)], style, ['left', ...shown.slice(1).map(() => 'right' as const)]);
  states.forEach((name, s) => {
    diffs.push([style.bold(name), ...shown.slice(1).map(() => '')]);
    for (const a of c.alternatives) {
      const d = a.difference[s]!;
      diffs.push([`  ${label(a.result.scenario)}`, ...shown.slice(1).map((_, n) => {
        const t = n + 1; // differences are kept at the shown years; the start year, a certain tie, is left out
        const o = a.odds[s]![t]!;
        const odds = o.tie === 1 ? 'tie in every draw' : `${percent(o.more)}% more${o.tie > 0 ? ` · ${percent(o.tie)}% tie` : ''}`;
        return `${signedBand({ median: signedPoints(d.median[t]!), low: signedPoints(d.low[t]!), high: signedPoints(d.high[t]!) })} (${odds})`;
      })]);
    }
  });
  lines.push(diffs.toString());

  if (all.some((r) => r.treatedStationary)) {
    const year = base.years[base.years.length - 1]!;
    lines.push('', style.bold(treatedStationaryTitle(year, sc.level)));
    const t = makeTable(['state / alternative', 'long-run share'], style, ['left', 'right']);
    const cell = (r: ForecastResult, s: number): string => {
      const bands = r.treatedStationary ? r.treatedStationary.bands : r.stationary.bands;
      return bands ? `${percentBand(bands[s]!)}${r.treatedStationary ? '' : ' (no treatment then: fitted chain)'}` : '—';
    };
    states.forEach((name, s) => {
      t.push([style.bold(name), '']);
      for (const r of all) t.push([`  ${label(r.scenario)}`, cell(r, s)]);
    });
    lines.push(t.toString(), style.dim(TREATED_STATIONARY_NOTE));
  }

  if (sc.target) {
    const last = base.years[base.years.length - 1];
    lines.push('', style.bold(`Landscape target: ${targetLabel(sc.target, states, sc.fit.step)}, by ${last}`));
    if (base.dominance!.alreadyMet) lines.push(`Already met in ${sc.start.year}, the start every alternative shares.`);
    const t = makeTable(['alternative', 'chance', 'first year (draws)', 'vs baseline', 'both: sooner · same · later',
      'only it · only baseline · neither', 'years (− earlier) if both', `holds in ${last} · every year`], style,
    ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'right']);
    const holds = (r: ForecastResult): string => `${percent(r.dominance!.holdsAtHorizon)}% · ${percent(r.dominance!.holdsThroughout)}%`;
    const first = (r: ForecastResult): string => (r.dominance!.alreadyMet && sc.target!.staysMet === 1 ? 'already met' : firstTimeCell(r.dominance!));
    t.push([label(base.scenario), `${percent(base.dominance!.probability)}%`, first(base), '', '', '', '', holds(base)]);
    for (const a of c.alternatives) {
      const dom = a.result.dominance!;
      const diff = a.dominance!;
      const o = diff.outcomes;
      t.push([label(a.result.scenario), `${percent(dom.probability)}%`, first(a.result),
        `${signedPoints(diff.probabilityDifference)} pts`,
        `${percent(o.sooner)}% · ${percent(o.same)}% · ${percent(o.later)}%`,
        `${percent(o.onlyAlternative)}% · ${percent(o.onlyBaseline)}% · ${percent(o.neither)}%`,
        timingCell(diff.years, diff.bothDraws, signedBand, 'draws where both reach it'), holds(a.result)]);
    }
    lines.push(t.toString());
    lines.push(style.dim(`Outcomes are shares of all ${base.draws} draws and add up to 100%. A draw in which neither reaches the ` +
      'target is not "the same year"; the years band rests only on the draws in which both reach it.'));
  }
  lines.push('', style.dim(CAUTION));
  return lines.join('\n') + '\n';
}

/** A share difference in percentage points with its sign (one decimal); zero shows as 0. */
function signedPoints(x: number): string {
  return signed(Math.round(x * 1000) / 10, 1);
}

/** `median [low – high]` for signed values: spaced dash, so "−14 – −1" cannot read as one number. */
function signedBand(b: { median: number | string; low: number | string; high: number | string }): string {
  const f = (x: number | string): string => (typeof x === 'number' ? signed(x) : x);
  return b.low === b.high ? f(b.median) : `${f(b.median)} [${f(b.low)} – ${f(b.high)}]`;
}
