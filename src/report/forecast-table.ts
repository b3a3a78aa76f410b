import { siteCount } from '../fit/fit.js';
import type { CarriedSites } from '../chain/latest-mix.js';
import type { ChalkInstance } from 'chalk';
import type { ForecastResult } from '../engine/forecast.js';
import { concentration, count, fitSites, latestCoverage, levelLabel, percent, percentBand, wholeBand } from './numbers.js';
import { BLOCK_CAUTION, CAUTION, makeTable } from './style.js';
import { priorSensitivityLines } from './prior-sensitivity.js';
import { firstTimeCell, targetLines } from './target-lines.js';
import { treatedStationaryLines } from './treated-stationary-lines.js';

/** The terminal report of one forecast: header, shares by year, stationary mix, first times, caution. */
export function forecastTable(r: ForecastResult, style: ChalkInstance): string {
  const { scenario: sc } = r;
  const { fit } = sc;
  const states = fit.states;
  const band = levelLabel(sc.level);
  const lines: string[] = [];
  lines.push(style.bold(`${sc.name}`) + style.dim(`  (${sc.file})`));
  const further = (fit.pairsByGap ?? []).reduce((s, p) => s + (p.gap > 1 ? p.pairs : 0), 0);
  lines.push(`data: ${fit.input.file} · ${fitSites(fit)} · ${count(fit.transitions, 'transition')}` +
    `${further > 0 ? ` + ${count(further, 'pair')} further apart` : ''} · ${fit.step}-year steps`);
  const varying = r.variation || r.variationByZone ? ` · year-to-year variation ${sc.variation.kind === 'given' ? 'given' : 'estimated'}` : '';
  lines.push(`uncertainty: ${sc.source} · ${count(r.draws, 'draw')} · seed ${r.seed}${varying} · bands ${band}`);
  lines.push(sc.start.from === 'latest'
    ? fit.errorModel
      ? `start: ${sc.start.year}, the true mix behind the records (observer error allowed for; ${fitSites(fit)}, each draw from its own sampler sweep)`
      : sc.start.carried?.length
      ? `start: ${sc.start.year}, the ${count(fit.latest.sites, 'site')} surveyed then ${carriedWords(sc.start.carried)}`
      : `start: ${sc.start.year}, the latest surveyed mix (${latestCoverage(fit.latest.sites, siteCount(fit))})`
    : `start: ${sc.start.year}, shares given in the scenario`);
  if (sc.zones) lines.push(zonesLine(sc));
  const inZones = (zones: readonly number[] | undefined): string => (zones ? ` in ${zones.map((z) => sc.zones!.names[z]).join(', ')}` : '');
  for (const t of sc.treatments) {
    lines.push(`treatment: ${t.name} (${states[t.row]}${t.area < 1 ? `, ${percent(t.area)}% of the ${t.zones ? 'zone area' : 'area'}` : ''}${inZones(t.zones)})`);
  }
  for (const e of sc.events) lines.push(`event: ${e.name} (${e.scope} scope${inZones(e.zones)})`);
  for (const note of r.notes) lines.push(style.yellow(`note: ${note}`));

  lines.push('', style.bold(`Share of the area by year, % — median [${band}]`));
  const shown = sc.showSteps.map((t) => r.steps.indexOf(t));
  const shares = makeTable(['state', ...shown.map((t) => String(r.years[t]))], style,
    ['left', ...shown.map(() => 'right' as const)]);
  states.forEach((name, s) => {
    const b = r.shares[s]!;
    shares.push([name, ...shown.map((t) => percentBand({ median: b.median[t]!, low: b.low[t]!, high: b.high[t]! }))]);
  });
  lines.push(shares.toString());
  for (const zone of r.zones ?? []) {
    lines.push('', style.bold(`Zone ${zone.name} (${percent(zone.share)}% of the area): share of the zone by year, % — median [${band}]`));
    const t = makeTable(['state', ...shown.map((n) => String(r.years[n]))], style, ['left', ...shown.map(() => 'right' as const)]);
    states.forEach((name, s) => {
      const b = zone.shares[s]!;
      t.push([name, ...shown.map((n) => percentBand({ median: b.median[n]!, low: b.low[n]!, high: b.high[n]! }))]);
    });
    lines.push(t.toString());
  }

  if (r.plots && sc.plots) {
    lines.push('', style.bold(`Plots in each state, of ${sc.plots.total}${plotScaleWords(sc)} — median [${band}], a prediction band`));
    const plots = makeTable(['state', ...shown.map((t) => String(r.years[t]))], style, ['left', ...shown.map(() => 'right' as const)]);
    states.forEach((name, s) => {
      const b = r.plots![s]!;
      plots.push([name, ...shown.map((t) => wholeBand({ median: b.median[t]!, low: b.low[t]!, high: b.high[t]! }))]);
    });
    lines.push(plots.toString());
  }

  lines.push('', style.bold(`Long-run (stationary) mix of the fitted chain, % — median [${band}] over draws`));
  const observed = r.observedRows;
  const without = observed?.bands ?? null;
  if (r.stationary.bands) {
    const dropped = new Set(observed?.dropped ?? []);
    const table = makeTable(['state', 'share', ...(without ? ['without never-surveyed rows'] : [])], style, ['left', 'right', 'right']);
    states.forEach((name, s) => table.push([name, percentBand(r.stationary.bands![s]!),
      ...(without ? [dropped.has(s) ? 'left out' : percentBand(without[s]!)] : [])]));
    lines.push(table.toString());
  }
  if (r.stationary.notUnique > 0) {
    lines.push(style.yellow(`${r.stationary.notUnique} of ${r.draws} draws have more than one closed class: ` +
      'their long-run mix depends on the start and is left out of these bands.'));
  }
  if (observed) lines.push(...observedRowsNotes(observed, states, r.draws, style));
  if (r.treatedStationary) lines.push('', ...treatedStationaryLines(r, style));
  if (r.priorSensitivity.length > 0) {
    lines.push('', ...priorSensitivityLines(states, r.priorSensitivity.map((p) => ({ reliance: p.reliance, columns: [p.horizon, p.longRun] })),
      [`${r.years[r.years.length - 1]} share`, 'long-run share'], style));
    // The check runs the pooled fit: with zones it is a landscape-wide one, not each zone's.
    if (sc.zones) lines.push(style.dim('With zones: the counts and shares above are those of the pooled fit of all zones, every zone run on its matrix (with the treatments); a zone\'s own rows may rest on the prior more.'));
  }

  const last = r.years[r.years.length - 1];
  if (r.dominance && sc.target) lines.push('', ...targetLines(r, style));

  lines.push('', style.bold(`When each state first becomes the most common in the landscape (to ${last})`));
  const common = makeTable(['state', 'chance', `first year [${band}] (draws)`], style, ['left', 'right', 'right']);
  states.forEach((name, s) => {
    const m = r.mostCommon[s]!;
    common.push([name, `${percent(m.probability)}%`, firstTimeCell(m)]);
  });
  lines.push(common.toString());
  if (r.variation) lines.push('', ...variationLines(r, style));
  if (r.variationByZone) lines.push('', ...zoneVariationLines(r, style));
  if (r.split) lines.push('', ...splitTable(r, style));
  lines.push('', style.dim(sc.source === 'bootstrap' && fit.spatial ? BLOCK_CAUTION : CAUTION));
  return lines.join('\n') + '\n';
}

/** What the "without never-surveyed rows" column means, and why it is missing when it is. */
function observedRowsNotes(o: NonNullable<ForecastResult['observedRows']>, states: readonly string[], draws: number, style: ChalkInstance): string[] {
  const names = o.dropped.map((s) => `'${states[s]}'`).join(', ');
  const lines = [style.yellow(`${names} ${o.dropped.length === 1 ? 'was' : 'were'} never surveyed as a from-state, so ${o.dropped.length === 1 ? 'its row comes' : 'their rows come'} ` +
    'from the prior alone; "without" is the chain restricted to the states seen as from-states (rows renormalised).')];
  if (!o.bands) {
    lines.push(style.yellow(o.undefinedDraws === draws
      ? `The mix without ${names} is withheld: from some surveyed state every possible transition leads to ${names}.`
      : `The mix without ${names} is withheld: the restricted chain has more than one closed class in every draw.`));
  } else if (o.undefinedDraws + o.notUnique > 0) {
    lines.push(style.yellow(`Without ${names}: ${o.undefinedDraws + o.notUnique} of ${draws} draws have no single long-run mix and are left out.`));
  }
  return lines;
}

const SOURCE_LABEL = { matrix: 'the fitted matrix', variation: 'year-to-year variation', events: 'event years', plots: 'plot-level chance' } as const;

const VARIATION_WHY = {
  estimated: '', given: 'given in the scenario', 'one-cell': 'does not vary (one possible transition)',
  'never-left': 'does not vary: never seen to leave', 'few-counts': 'does not vary: too few periods with two or more transitions',
  'no-periods': 'does not vary: the fit file has no per-period counts',
} as const;

/** κ per state: how alike the years are (a year's probability p varies with variance p(1 − p)/(κ + 1)). */
function variationLines(r: ForecastResult, style: ChalkInstance): string[] {
  const table = makeTable(['state', 'κ (how alike years are)', 'periods', 'note'], style, ['left', 'right', 'right', 'left']);
  r.scenario.fit.states.forEach((name, s) => {
    const v = r.variation![s]!;
    const kappa = v.kappa ? (v.kappa.low === v.kappa.high ? concentration(v.kappa.median) : `${concentration(v.kappa.median)} [${concentration(v.kappa.low)}–${concentration(v.kappa.high)}]`) : '—';
    const why = v.status === 'given' && !v.kappa ? 'does not vary (not listed)' : VARIATION_WHY[v.status];
    table.push([name, kappa, v.status === 'given' ? '' : String(v.informativePeriods), why]);
  });
  return [style.bold('Year-to-year variation — each year draws its own matrix around the fitted one'), table.toString(),
    style.dim('Small κ: years differ a lot; large κ: years are alike (κ = 100 lets a probability of 0.5 swing by about ±0.05 a year). Periods: survey periods with two or more transitions from the state.')];
}


/** With zones fitted each on their own, each zone's κ per state: no one κ speaks for the landscape. */
function zoneVariationLines(r: ForecastResult, style: ChalkInstance): string[] {
  const zones = r.variationByZone!;
  const table = makeTable(['state', ...zones.map((z) => `κ ${z.zone}`)], style, ['left', ...zones.map(() => 'right' as const)]);
  r.scenario.fit.states.forEach((name, s) => {
    table.push([name, ...zones.map((z) => {
      const v = z.rows?.[s];
      if (!v?.kappa) return '—';
      return v.kappa.low === v.kappa.high ? concentration(v.kappa.median) : `${concentration(v.kappa.median)} [${concentration(v.kappa.low)}–${concentration(v.kappa.high)}]`;
    })]);
  });
  return [style.bold('Year-to-year variation — each zone estimates its own κ from its own record (pooling: none)'), table.toString(),
    style.dim('Small κ: years differ a lot; large κ: years are alike. —: the row does not vary in that zone.')];
}

/** Band width at the horizon, and what it would be with each source of uncertainty switched off. */
function splitTable(r: ForecastResult, style: ChalkInstance): string[] {
  const split = r.split!;
  const last = r.years[r.years.length - 1];
  const unit = split.quantity === 'plots' ? 'share of plots' : 'share of area';
  const table = makeTable(['state', 'band width', ...split.sources.map((s) => `without ${SOURCE_LABEL[s.source]}`)], style,
    ['left', 'right', ...split.sources.map(() => 'right' as const)]);
  r.scenario.fit.states.forEach((name, s) => {
    table.push([name, points(split.width[s]!), ...split.sources.map((src) =>
      `${points(src.widthWithout[s]!)} (${percent(Math.max(0, src.varianceShare[s]!))}% of variance)`)]);
  });
  return [style.bold(`Where the uncertainty in ${last} comes from — band width in percentage points (${unit})`), table.toString(),
    style.dim('A large share for the fitted matrix means more surveys would narrow the bands; year-to-year variation, event years and plot-level chance will not shrink with more data. ' +
      'A share is 1 − Var(without it) / Var(all on); sources interact, so the shares need not add up to 100%.')];
}

function points(x: number): string {
  return (x * 100).toFixed(1);
}

/** "plus N sites carried forward from their last survey through each draw (1–3 steps back)"; empty when none were. */
export function carriedWords(carried: readonly CarriedSites[] | undefined): string {
  if (!carried?.length) return '';
  const sites = carried.reduce((s, c) => s + c.sites, 0);
  const near = Math.min(...carried.map((c) => c.steps));
  const far = Math.max(...carried.map((c) => c.steps));
  return `plus ${count(sites, 'site')} carried forward from their last survey through each draw ` +
    `(${near === far ? near : `${near}–${far}`} step${far === 1 ? '' : 's'} back)`;
}

/** The zones of a stratified forecast: pooling, and each zone's share of the area with where it came from; `hint`: say that --zones shows each (not where each is always shown). */
export function zonesLine(sc: ForecastResult['scenario'], hint = true): string {
  const zones = sc.zones!;
  const pooling = sc.fit.zones!.pooling === 'partial' ? 'partially pooled' : 'each its own fit';
  const parts = zones.names.map((name, z) => `${name} ${percent(zones.shares[z]!)}%${zones.areas ? ` (${zones.areas[z]} ${zones.unit})` : ''}`);
  const from = zones.from === 'plots' ? ' by share of plots' : '';
  return `zones (${sc.fit.zones!.column}, ${pooling}): ${parts.join(' · ')}${from} — each from its own latest survey on its own matrix${hint && sc.alternative === undefined ? '; --zones shows each' : ''}`;
}

/** With observer error, which states the plot counts are of; without, the records are the truth and nothing is said. */
function plotScaleWords(sc: ForecastResult['scenario']): string {
  if (!sc.fit.errorModel) return '';
  if (sc.plots?.scale !== 'recorded') return ', true states (not as recorded)';
  if (sc.plots.observer) return `, as ${sc.plots.observer.name} would record them (through their error matrix)`;
  return sc.fit.errorModel.observers ? ', as a survey would record them (through the pooled error matrix of all observers)' : ', as a survey would record them (through the error matrix)';
}
