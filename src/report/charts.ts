import type { TopLevelSpec } from 'vega-lite';
import type { ForecastResult } from '../engine/forecast.js';
import type { Comparison } from '../engine/compare.js';
import { wilsonInterval } from '../evaluation/wilson.js';
import { NEUTRAL, stateColours } from './palette.js';
import { chartLabel } from './chart-label.js';
import { targetLabel } from './target-lines.js';

/**
 * Panels are built as plain objects and cast once at the top: vega-lite's types for nested
 * layer-in-concat specs do not narrow through helper functions; the render tests compile every shape.
 */
type Spec = Record<string, unknown>;
type Domain = [number, number];

const SCHEMA = 'https://vega.github.io/schema/vega-lite/v6.json';
const pct = (x: number): number => x * 100;
const levelPct = (level: number): number => Math.round(level * 100);

/** A scale domain around the values: padded by a twentieth of their span (at least a point), kept within `limits`. */
export function domainOf(values: readonly number[], limits: Domain = [-Infinity, Infinity]): Domain {
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const pad = Math.max(1, (hi - lo) / 20);
  return [Math.max(limits[0], Math.floor(lo - pad)), Math.min(limits[1], Math.ceil(hi + pad))];
}

interface HistoryPoint { readonly year: number; readonly state: string; readonly share: number; readonly low: number; readonly high: number }

/**
 * The surveyed shares by survey year with Wilson intervals at the scenario's level — drawn only
 * when the forecast starts from the latest surveyed mix, since a forecast from given shares (a
 * new cell) does not continue that history.
 */
function history(r: ForecastResult): HistoryPoint[] {
  const sc = r.scenario;
  if (sc.start.from !== 'latest' || !sc.fit.history) return [];
  return sc.fit.history.filter((m) => m.time <= sc.start.year).flatMap((m) => sc.fit.states.map((state, s) => {
    const { low, high } = wilsonInterval(m.counts[s]!, m.sites, sc.level);
    return { year: m.time, state: chartLabel(state), share: pct(m.counts[s]! / m.sites), low: pct(low), high: pct(high) };
  }));
}

function bandRows(r: ForecastResult, s: number): { year: number; state: string; median: number; low: number; high: number }[] {
  const state = chartLabel(r.scenario.fit.states[s]!);
  return r.years.map((year, t) => ({ year, state, median: pct(r.shares[s]!.median[t]!), low: pct(r.shares[s]!.low[t]!), high: pct(r.shares[s]!.high[t]!) }));
}

/** The colour channel every state-coloured mark uses: one scale, shared by all panels, one legend with full labels. */
function colourOf(states: readonly string[]): Spec {
  return {
    field: 'state', type: 'nominal',
    scale: { domain: states.map(chartLabel), range: stateColours(states) },
    legend: { title: 'state', labelLimit: 0, orient: 'bottom', direction: 'horizontal', symbolOpacity: 1 },
  };
}

interface PanelOptions {
  readonly result: ForecastResult;
  readonly state: number;
  readonly y: Domain;
  readonly x: Domain;
  readonly title: string | null;
  readonly width: number;
  readonly height: number;
  /** The baseline's median, drawn grey and dashed for reference in an alternative's panel. */
  readonly reference?: ForecastResult;
}

/**
 * The threshold to draw as a rule in state s's panel: only for a target on that one state — a
 * target on a set of states is about their sum, which no single panel shows.
 */
function singleStateTarget(r: ForecastResult, s: number): number | null {
  const t = r.scenario.target;
  return t && t.states.length === 1 && t.states[0] === s ? t.threshold : null;
}

/** The values a share panel draws, to scale its y-axis to them. */
function panelValues(r: ForecastResult, s: number, withTarget: boolean): number[] {
  const rows = bandRows(r, s);
  const state = r.scenario.fit.states[s]!;
  const past = history(r).filter((h) => h.state === chartLabel(state));
  const target = withTarget && singleStateTarget(r, s) !== null ? [pct(singleStateTarget(r, s)!)] : [];
  return [...rows.flatMap((b) => [b.low, b.high]), ...past.flatMap((h) => [h.low, h.high]), ...target];
}

/** One state's panel: surveyed history, the start, the band and median, the baseline for reference, the target. */
function sharePanel(o: PanelOptions): Spec {
  const r = o.result;
  const sc = r.scenario;
  const state = sc.fit.states[o.state]!;
  const colour = colourOf(sc.fit.states);
  const x = { field: 'year', type: 'quantitative', scale: { domain: o.x, nice: false }, axis: { format: 'd', title: null, tickCount: 5 } };
  const y = (field: string): Spec => ({ field, type: 'quantitative', scale: { domain: o.y, nice: false, zero: false }, title: '%' });
  const layer: Spec[] = [];
  const past = history(r).filter((h) => h.state === chartLabel(state));
  if (past.length > 0) {
    layer.push(
      { data: { values: [{ year: sc.start.year }] }, mark: { type: 'rule', color: NEUTRAL.rule, strokeDash: [2, 2] }, encoding: { x } },
      { data: { values: past }, mark: { type: 'rule', strokeWidth: 1.5 }, encoding: { x, y: y('low'), y2: { field: 'high' }, color: colour } },
      { data: { values: past }, mark: { type: 'point', filled: true, size: 28, opacity: 1 }, encoding: { x, y: y('share'), color: colour } },
    );
  }
  const band = bandRows(r, o.state);
  layer.push(
    { data: { values: band }, mark: { type: 'area', opacity: 0.25 }, encoding: { x, y: y('low'), y2: { field: 'high' }, color: colour } },
    { data: { values: band }, mark: { type: 'line', strokeWidth: 2 }, encoding: { x, y: y('median'), color: colour } },
  );
  if (o.reference) {
    layer.push({ data: { values: bandRows(o.reference, o.state) }, mark: { type: 'line', strokeWidth: 1, strokeDash: [4, 3], color: NEUTRAL.reference },
      encoding: { x, y: y('median') } });
  }
  const threshold = singleStateTarget(r, o.state);
  if (threshold !== null) {
    const share = pct(threshold);
    const values = [{ share, label: `target: ${sc.target!.bound === 'at-least' ? 'at least' : 'at most'} ${Number(share.toFixed(1))}%` }];
    layer.push(
      { data: { values }, mark: { type: 'rule', color: NEUTRAL.target, strokeDash: [6, 3], strokeWidth: 1.2 }, encoding: { y: y('share') } },
      { data: { values }, mark: { type: 'text', align: 'left', baseline: 'bottom', dx: 3, dy: -2, fontSize: 10, color: NEUTRAL.target },
        encoding: { x: { value: 0 }, y: y('share'), text: { field: 'label' } } },
    );
  }
  return { ...(o.title === null ? {} : { title: { text: o.title, limit: 0 } }), width: o.width, height: o.height, layer };
}

function xDomainOf(results: readonly ForecastResult[]): Domain {
  const years = results.flatMap((r) => [...r.years, ...history(r).map((h) => h.year)]);
  return [Math.min(...years), Math.max(...years)];
}

function subtitle(results: readonly ForecastResult[], baseline: boolean): string[] {
  const level = levelPct(results[0]!.scenario.level);
  const lines = [`share of the area, %: forecast median (line) and ${level}% band (shaded)`];
  if (results.some((r) => history(r).length > 0)) lines.push(`surveyed share by survey year (dots) with its ${level}% Wilson score interval`);
  if (baseline) lines.push(`grey dashed line: the baseline's median (${results[0]!.scenario.alternative ?? results[0]!.scenario.name})`);
  const target = results.find((r) => r.scenario.target)?.scenario;
  if (target?.target && target.target.states.length === 1) lines.push('black dashed rule: the landscape target');
  // A target on several states is about their summed share, which no one state's panel shows.
  else if (target?.target) lines.push(`landscape target: ${targetLabel(target.target, target.fit.states, target.fit.step)} (their summed share; see the target table)`);
  return lines;
}

/**
 * The fan chart as a Vega-Lite spec. One forecast: one panel per state (three to a row), each with
 * its own y-axis scaled to its data. Several (alternatives, or several scenario files): one row
 * per forecast, one column per state, a state's y-axis shared down its column so rows can be
 * compared; with `baseline`, the first forecast's median is repeated grey and dashed in the other
 * rows. Rendered to SVG by vega (render-svg.ts).
 */
export function fanChartSpec(results: readonly ForecastResult[], title: string, options: { readonly baseline?: boolean } = {}): TopLevelSpec {
  const x = xDomainOf(results);
  const head = { $schema: SCHEMA, title: { text: title, subtitle: subtitle(results, Boolean(options.baseline) && results.length > 1), anchor: 'start' },
    config: { font: 'sans-serif', view: { stroke: '#ccc' }, title: { limit: 0 } } };
  if (results.length === 1) {
    const r = results[0]!;
    const panels = r.scenario.fit.states.map((state, s) => sharePanel({
      result: r, state: s, x, y: domainOf(panelValues(r, s, true), [0, 100]), title: chartLabel(state), width: 220, height: 140,
    }));
    return { ...head, concat: panels, columns: Math.min(3, panels.length) } as unknown as TopLevelSpec;
  }
  const stateNames = [...new Set(results.flatMap((r) => r.scenario.fit.states))];
  const yByState = new Map(stateNames.map((name) => [name, domainOf(results.flatMap((r) => {
    const s = r.scenario.fit.states.indexOf(name);
    return s < 0 ? [] : [...panelValues(r, s, true), ...(options.baseline ? panelValues(results[0]!, s, false) : [])];
  }), [0, 100])]));
  const rows = results.map((r, n) => ({
    title: { text: chartLabel(r.scenario.alternative ?? r.scenario.name), anchor: 'start', fontSize: 13, limit: 0 },
    hconcat: r.scenario.fit.states.map((state, s) => sharePanel({
      result: r, state: s, x, y: yByState.get(state)!, title: chartLabel(state), width: 150, height: 90,
      reference: options.baseline && n > 0 ? results[0] : undefined,
    })),
  }));
  return { ...head, vconcat: rows } as unknown as TopLevelSpec;
}

/**
 * The second chart of a comparison: for each state, each alternative's difference from the
 * baseline at the horizon, in percentage points — the median as a dot and the band as a bar —
 * with zero marked. Each panel's x-axis is scaled to its own data (and zero).
 */
export function differenceChartSpec(c: Comparison, title: string): TopLevelSpec {
  const base = c.baseline;
  const sc = base.scenario;
  const states = sc.fit.states;
  const year = base.years[base.years.length - 1]!;
  const names = c.alternatives.map((a) => chartLabel(a.result.scenario.alternative ?? a.result.scenario.name));
  const colour = colourOf(states);
  const panels = states.map((state, s) => {
    const values = c.alternatives.map((a, n) => ({
      state: chartLabel(state), alternative: names[n]!, median: pct(a.atHorizon[s]!.median), low: pct(a.atHorizon[s]!.low), high: pct(a.atHorizon[s]!.high),
    }));
    const x = { type: 'quantitative', scale: { domain: domainOf([0, ...values.flatMap((v) => [v.low, v.high])]), nice: false }, title: 'points' };
    const y = { field: 'alternative', type: 'nominal', sort: names, axis: s % 3 === 0 ? { title: null, labelLimit: 0 } : { title: null, labels: false, ticks: false } };
    return {
      title: { text: chartLabel(state), limit: 0 }, width: 160, height: 24 * names.length,
      layer: [
        { data: { values: [{ zero: 0 }] }, mark: { type: 'rule', color: NEUTRAL.rule }, encoding: { x: { ...x, field: 'zero' } } },
        { data: { values }, mark: { type: 'rule', strokeWidth: 3 }, encoding: { x: { ...x, field: 'low' }, x2: { field: 'high' }, y, color: colour } },
        { data: { values }, mark: { type: 'point', filled: true, size: 60, opacity: 1 }, encoding: { x: { ...x, field: 'median' }, y, color: colour } },
      ],
    };
  });
  return {
    $schema: SCHEMA,
    title: { text: title, anchor: 'start', limit: 0,
      subtitle: [`difference from the baseline (${base.scenario.alternative ?? base.scenario.name}) in ${year}, percentage points`,
        `dot: median; bar: ${levelPct(sc.level)}% band over the same matrix draws (common random numbers)`] },
    concat: panels,
    columns: Math.min(3, panels.length),
    config: { font: 'sans-serif', view: { stroke: '#ccc' }, title: { limit: 0 } },
  } as unknown as TopLevelSpec;
}
