import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const sc = (name: string): string => `test/fixtures/scenarios/${name}`;

describe('sere compare (built binary)', () => {
  it('an alternative compared with itself differs by exactly zero, reported as ties', () => {
    const r = sere(['compare', sc('same-twice.yaml'), '--json']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.format).toBe('sere-comparison');
    const alt = json.alternatives[0];
    for (const state of ['a', 'b', 'c']) {
      expect(alt.difference[state].median.every((x: number) => x === 0)).toBe(true);
      expect(alt.difference[state].low.every((x: number) => x === 0)).toBe(true);
      expect(alt.difference[state].high.every((x: number) => x === 0)).toBe(true);
      expect(alt.odds[state].tie.every((x: number) => x === 1)).toBe(true);
      expect(alt.odds[state].more.every((x: number) => x === 0)).toBe(true);
    }
    // Identical alternatives reach the target in the same year in every draw where either reaches it
    // (hand.csv's site B, last surveyed two steps before the start, is carried forward through each
    // draw, so in some draws neither does).
    expect(json.format_version).toBe(3);
    expect(alt.dominance_difference).toMatchObject({ probability: 0, both: { sooner: 0, later: 0 }, only_alternative: 0, only_baseline: 0 });
    expect(alt.dominance_difference.both.same + alt.dominance_difference.neither).toBeCloseTo(1, 12);
    expect(alt.dominance_difference.both_draws).toBe(Math.round(300 * alt.dominance_difference.both.same));
    expect(json.baseline.plots.c).toEqual(alt.plots.c);
    // The half-area treatment lasts to the horizon: the same treated long-run mix in both, labelled by year and treatment.
    expect(Object.keys(alt.stationary_treated)).toEqual(['year', 'treatments', 'definition', 'stationary', 'unique', 'not_unique']);
    expect(alt.stationary_treated).toMatchObject({ year: json.baseline.years[json.baseline.years.length - 1], treatments: ['t'], unique: 300, not_unique: 0 });
    expect(alt.stationary_treated.stationary).toEqual(json.baseline.stationary_treated.stationary);
    expect(Object.keys(alt.stationary_treated.stationary)).toEqual(['a', 'b', 'c']);
    const table = sere(['compare', sc('same-twice.yaml')]);
    expect(table.stdout).toContain('0 (tie in every draw)');
  });

  it('two files are compared the same way as one file listing them', () => {
    const r = sere(['compare', sc('good.yaml'), sc('managed.yaml').replace('managed', 'good'), '--json']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.alternatives[0].odds.c.tie.every((x: number) => x === 1)).toBe(true);
    expect(json.difference_years).toEqual([7, 12]);
  });

  it('management changes the outcome on the same random numbers', () => {
    const r = sere(['compare', sc('good.yaml'), sc('managed-lite.yaml'), '--draws', '300', '--json']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.alternatives[0].name).toBe('managed-lite');
    expect(json.alternatives[0].odds.c.tie[1]).toBeLessThan(1);
  });

  const bad: [string, string[], string][] = [
    ['one alternative only', [sc('good.yaml')], 'only one alternative to compare'],
    ['plots in one alternative only', [sc('managed-lite.yaml'), sc('managed.yaml')], 'plots differs'],
    ['different horizons', [sc('good.yaml'), sc('other-horizon.yaml')], `${sc('other-horizon.yaml')}: cannot be compared with ${sc('good.yaml')}: the horizon differs`],
    ['a treatment pushing a probability above 1', [sc('treat-above-one.yaml'), sc('treat-above-one.yaml')], `${sc('treat-above-one.yaml')}:4:5 (treatments[0]): treatment 'boost' pushes probabilities out of 'a' above 1`],
    ['a change that cannot be met', [sc('treat-unmet.yaml'), sc('treat-unmet.yaml')], `${sc('treat-unmet.yaml')}:4:5 (treatments[0]): treatment 'thin' cannot be met`],
    ['an unknown state in a treatment', [sc('good.yaml'), sc('treat-unknown-state.yaml')], `${sc('treat-unknown-state.yaml')}:5:12 (treatments[0].state): unknown state 'woodland'`],
    ['conflicting windows', [sc('treat-conflict.yaml')], `${sc('treat-conflict.yaml')}:10:15 (treatments[1].set.c): sets b>c in 12`],
    ['an event row not summing to 1', [sc('event-row-sum.yaml')], `${sc('event-row-sum.yaml')}:7:10 (events[0].matrix.b): row 'b' of event 'flood' sums to 0.9`],
  ];
  for (const [what, args, message] of bad) {
    it(`${what}: exit 1 with one line naming file:line and key path`, () => {
      const r = sere(['compare', ...args]);
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    });
  }
});

describe('sere forecast with management (built binary)', () => {
  it('prints plot-count bands and where the uncertainty comes from', () => {
    const r = sere(['forecast', sc('managed.yaml')]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Plots in each state, of 20');
    expect(r.stdout).toContain('Where the uncertainty in 12 comes from');
    const json = JSON.parse(sere(['forecast', sc('managed.yaml'), '--json']).stdout).scenarios[0];
    expect(json.uncertainty_split.sources.map((s: { source: string }) => s.source)).toEqual(['matrix', 'events', 'plots']);
    expect(json.plots.total).toBe(20);
    // 20 plots split by the start shares (1/9, 1/4, 23/36: site B carried forward, test/scenario/load-scenario.test.ts) by largest remainder.
    expect(json.plots.c.median[0]).toBe(13);
  });
});
