import { stringify } from 'csv-stringify/sync';
import type { ForecastResult } from '../engine/forecast.js';

/**
 * A forecast as a tidy table for R and Python users: one row per scenario, year, state and
 * statistic (median, low, high, mean of the share; plots_median … when plots are counted).
 */
export function tidyCsv(results: readonly ForecastResult[]): string {
  const rows: (string | number)[][] = [];
  for (const r of results) {
    const name = r.scenario.name;
    r.scenario.fit.states.forEach((state, s) => {
      const groups: [string, ForecastResult['shares'][number] | undefined][] = [['', r.shares[s]], ['plots_', r.plots?.[s]]];
      for (const [prefix, bands] of groups) {
        if (!bands) continue;
        r.years.forEach((year, t) => {
          for (const stat of ['median', 'low', 'high', 'mean'] as const) rows.push([name, year, state, `${prefix}${stat}`, bands[stat][t]!]);
        });
      }
    });
  }
  return stringify(rows, { header: true, columns: ['scenario', 'year', 'state', 'statistic', 'value'] });
}
