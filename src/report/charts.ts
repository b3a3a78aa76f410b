import type { TopLevelSpec } from 'vega-lite';
import type { ForecastResult } from '../engine/forecast.js';
import { chartLabel } from './chart-label.js';

type Row = { scenario: string; state: string; year: number; median: number; low: number; high: number };

function rows(results: readonly ForecastResult[]): Row[] {
  return results.flatMap((r) => r.scenario.fit.states.flatMap((state, s) => r.years.map((year, t) => ({
    scenario: r.scenario.alternative ?? r.scenario.name,
    state: chartLabel(state),
    year,
    median: r.shares[s]!.median[t]! * 100,
    low: r.shares[s]!.low[t]! * 100,
    high: r.shares[s]!.high[t]! * 100,
  }))));
}

/**
 * A fan chart as a Vega-Lite spec: one small panel per state, the median share as a line and the
 * credible band as a shaded area, by year. With several alternatives the panels overlay them in
 * different colours — the comparison chart. Rendered to SVG by vega (see render-svg.ts).
 */
export function fanChartSpec(results: readonly ForecastResult[], title: string): TopLevelSpec {
  const level = results[0]!.scenario.level;
  const several = results.length > 1;
  const names = results.map((r) => r.scenario.alternative ?? r.scenario.name);
  const colour = several
    ? { field: 'scenario', type: 'nominal' as const, title: 'alternative', scale: { domain: names } }
    : { field: 'state', type: 'nominal' as const, legend: null };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: title, subtitle: `share of the area, %: median and ${Math.round(level * 100)}% band` },
    data: { values: rows(results) },
    facet: { field: 'state', type: 'nominal', title: null, sort: results[0]!.scenario.fit.states.map(chartLabel) },
    columns: 3,
    spec: {
      width: 220,
      height: 140,
      layer: [
        {
          // Overlaid alternatives need lighter bands to stay readable.
          mark: { type: 'area', opacity: several ? 0.12 : 0.25 },
          encoding: {
            x: { field: 'year', type: 'quantitative', axis: { format: 'd', title: null } },
            y: { field: 'low', type: 'quantitative', title: '%', scale: { domain: [0, 100] } },
            y2: { field: 'high' },
            color: colour,
          },
        },
        {
          mark: { type: 'line', strokeWidth: 2 },
          encoding: {
            x: { field: 'year', type: 'quantitative' },
            y: { field: 'median', type: 'quantitative' },
            color: colour,
          },
        },
      ],
    },
    config: { font: 'sans-serif', view: { stroke: '#ccc' }, legend: { symbolOpacity: 1 } },
  };
}
