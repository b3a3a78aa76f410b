import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, tidyCsv } from '../../src/report/tidy-csv.js';
import { runForecast } from '../../src/engine/forecast.js';
import { runComparison } from '../../src/engine/compare.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { atLeast, fitWithCounts, scenarioFor, treatmentOf } from '../helpers.js';

type Row = Record<(typeof CSV_COLUMNS)[number], string>;
const read = (csv: string): Row[] => parse(csv, { columns: true }) as Row[];
const pick = (rows: Row[], where: Partial<Row>): Row[] =>
  rows.filter((r) => Object.entries(where).every(([k, v]) => r[k as keyof Row] === v));

describe('tidy CSV', () => {
  const fit = fitWithCounts(['bare', 'grass', 'shrub'], [[40, 10, 0], [5, 30, 15], [2, 4, 36]]);
  const base = scenarioFor(fit, { draws: 400, target: atLeast(2, 0.4), alternative: 'nothing' });
  const managed = { ...base, alternative: 'push', treatments: [treatmentOf(1, { kind: 'multiply', cells: [{ to: 2, value: 3 }] }, 10)] };

  it('holds every share of a forecast as a percentage to 0.1, with the target chance and timing', () => {
    const result = runForecast(base, randomStreams(3));
    const csv = tidyCsv([result]);
    expect(csv.split('\n')[0]).toBe('scenario,alternative,state,year,measure,statistic,value,unit');
    const rows = read(csv);
    // 3 states × 11 years × 4 statistics, plus threshold, chance, 3 timing rows and their draws,
    // already met, and the two chances it holds.
    expect(rows.length).toBe(3 * 11 * 4 + 9);
    expect(Number(pick(rows, { measure: 'target_year', statistic: 'draws' })[0]!.value)).toBe(result.dominance!.draws);
    expect(Number(pick(rows, { measure: 'target_holds', statistic: 'at_horizon' })[0]!.value))
      .toBe(Math.round(result.dominance!.holdsAtHorizon * 1000) / 10);
    for (const [s, state] of fit.states.entries()) {
      result.years.forEach((year, t) => {
        const [median] = pick(rows, { state, year: String(year), measure: 'share', statistic: 'median' });
        expect(Number(median!.value)).toBe(Math.round(result.shares[s]!.median[t]! * 1000) / 10);
        expect(median!.unit).toBe('percent');
      });
    }
    const [chance] = pick(rows, { measure: 'target_chance' });
    expect(chance!.state).toBe('shrub');
    expect(chance!.year).toBe('2010');
    expect(Number(chance!.value)).toBe(Math.round(result.dominance!.probability * 1000) / 10);
    expect(Number(pick(rows, { measure: 'target_share' })[0]!.value)).toBe(40);
    const median = pick(rows, { measure: 'target_year', statistic: 'median' })[0]!;
    expect(median.value === '' ? null : Number(median.value)).toBe(result.dominance!.year?.median ?? null);
    for (const r of pick(rows, { measure: 'share' })) expect(Number(r.value) * 10).toBe(Math.round(Number(r.value) * 10));
  });

  it('adds differences, chances of more and the target compared for a comparison', () => {
    const c = runComparison([base, managed], randomStreams(3), undefined, { everyYear: true });
    const rows = read(tidyCsv([c.baseline, c.alternatives[0]!.result], c));
    const alt = c.alternatives[0]!;
    // Differences at the shown years [0, 5, 10], per state, four statistics; odds twice.
    expect(pick(rows, { measure: 'difference' }).length).toBe(3 * 3 * 4);
    expect(pick(rows, { measure: 'chance_more' }).length).toBe(9);
    const [diff] = pick(rows, { measure: 'difference', state: 'shrub', year: '2010', statistic: 'median' });
    expect(diff!.alternative).toBe('push');
    expect(diff!.unit).toBe('points');
    expect(Number(diff!.value)).toBe(Math.round(alt.difference[2]!.median[2]! * 1000) / 10);
    // Pushing grass to shrub gives more shrub in most draws by the horizon.
    const [more] = pick(rows, { measure: 'chance_more', state: 'shrub', year: '2010' });
    expect(Number(more!.value)).toBe(Math.round(alt.odds[2]![2]!.more * 1000) / 10);
    expect(Number(more!.value)).toBeGreaterThan(50);
    const outcomes = pick(rows, { measure: 'target_outcome' }).map((r) => Number(r.value));
    expect(outcomes.length).toBe(6);
    expect(Math.abs(outcomes.reduce((a, b) => a + b, 0) - 100)).toBeLessThan(0.35);
    expect(Number(pick(rows, { measure: 'target_both_draws' })[0]!.value)).toBe(alt.dominance!.bothDraws);
    // The baseline and the alternative each have their shares every year.
    expect(pick(rows, { measure: 'share', alternative: 'nothing', statistic: 'median' }).length).toBe(33);
    expect(pick(rows, { measure: 'share', alternative: 'push', statistic: 'median' }).length).toBe(33);
  });
});
