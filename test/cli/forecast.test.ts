import { describe, expect, it } from 'vitest';
import { CAUTION } from '../../src/report/style.js';
import { sere } from './binary.js';

const sc = (name: string): string => `test/fixtures/scenarios/${name}`;

describe('sere forecast (built binary)', () => {
  it('prints tables with the seed, plain text off a TTY, ending with the caution line', () => {
    const r = sere(['forecast', sc('good.yaml')]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('seed 11');
    expect(r.stdout).toContain('Share of the area by year, % — median [5%–95%]');
    expect(r.stdout).toContain('Landscape target: c covering at least 50% of the whole area');
    expect(r.stdout.trimEnd().endsWith(CAUTION)).toBe(true);
    expect(r.stdout).not.toContain('\u001b[');
  });

  it('gives byte-identical JSON for the same inputs and seed', () => {
    const a = sere(['forecast', sc('good.yaml'), '--json']);
    const b = sere(['forecast', sc('good.yaml'), '--json']);
    expect(a.code).toBe(0);
    expect(a.stdout).toBe(b.stdout);
    const c = sere(['forecast', sc('good.yaml'), '--json', '--seed', '12']);
    expect(c.stdout).not.toBe(a.stdout);
  });

  it('--json has the documented keys per scenario', () => {
    const json = JSON.parse(sere(['forecast', sc('good.yaml'), '--json']).stdout);
    const s = json.scenarios[0];
    expect(json.format).toBe('sere-forecast');
    expect(s.years).toEqual([7, 8, 9, 10, 11, 12]);
    expect(Object.keys(s.shares)).toEqual(['a', 'b', 'c']);
    expect(Object.keys(s.shares.a)).toEqual(['median', 'low', 'high', 'mean']);
    expect(s.shares.c.median).toHaveLength(6);
    // Site A starts in c; site B, last surveyed two steps earlier, is carried forward through each draw.
    expect(s.shares.c.median[0]).toBeGreaterThan(0.5);
    expect(s.shares.c.low[0]).toBeLessThan(s.shares.c.high[0]);
    expect(s.start.carried).toEqual([{ state: 'b', steps: 2, sites: 1 }]);
    expect(Object.keys(s.stationary.b)).toEqual(['median', 'low', 'high']);
    expect(json.format_version).toBe(2);
    expect(Object.keys(s.dominance)).toEqual(['states', 'bound', 'threshold', 'stays_met', 'already_met', 'probability', 'draws',
      'median', 'low', 'high', 'holds_at_horizon', 'holds_throughout', 'short_at_horizon']);
    // The start is all c: the target is met at the start, so there is no first year to band.
    expect(s.dominance).toMatchObject({ states: ['c'], bound: 'at_least', threshold: 0.5, stays_met: 1, already_met: true,
      probability: 1, draws: 200, median: null, low: null, high: null });
    expect(s.dominance.holds_throughout).toBeLessThanOrEqual(s.dominance.holds_at_horizon);
    expect(Object.keys(s.most_common.a)).toEqual(['probability', 'draws', 'median', 'low', 'high']);
    expect(s.most_common.c).toEqual({ probability: 1, draws: 200, median: 7, low: 7, high: 7 });
    expect(s.stationary_treated).toBeNull(); // no treatments
    expect(s.uncertainty).toEqual({ source: 'posterior', draws: 200, seed: 11 });
  });

  it('--json gives the long-run mix without never-surveyed rows and the prior sensitivity', () => {
    const s = JSON.parse(sere(['forecast', sc('never-from.yaml'), '--json']).stdout).scenarios[0];
    expect(s.stationary_observed_rows.dropped).toEqual(['c']);
    expect(Object.keys(s.stationary_observed_rows.stationary)).toEqual(['a', 'b']);
    expect(s.stationary_observed_rows).toMatchObject({ unique: 400, not_unique: 0, undefined_draws: 0 });
    expect(s.prior_sensitivity).toMatchObject({ priors: [0.1, 0.5, 1], method: 'posterior-mean', horizon_year: 15 });
    const c = s.prior_sensitivity.states[0];
    expect(c).toMatchObject({ state: 'c', reason: 'never-from', transitions: 0, leaving: 0, prior_leaving: 1 });
    // Its prior row alone gives c a long-run share under every prior.
    expect(c.long_run).toHaveLength(3);
    expect(c.horizon).toHaveLength(3);
    for (const x of c.long_run) expect(x).toBeGreaterThan(0.1);
    // Every state of the demo was surveyed as a from-state: nothing to restrict.
    const demo = JSON.parse(sere(['forecast', 'scenarios/brenhollow/no-action.yaml', '--draws', '200', '--json']).stdout).scenarios[0];
    expect(demo.stationary_observed_rows).toBeNull();
    expect(demo.prior_sensitivity.states.map((x: { state: string }) => x.state)).toEqual(['high-marsh', 'rank-grass']);
  });

  it('prints a fresh seed on stderr when none is given, and --draws overrides the scenario', () => {
    const r = sere(['forecast', sc('typo.yaml').replace('typo', 'no-seed'), '--draws', '50', '--json']);
    expect(r.code).toBe(0);
    const seed = /using seed (\d+)/.exec(r.stderr)?.[1];
    expect(seed).toBeDefined();
    expect(JSON.parse(r.stdout).scenarios[0].uncertainty).toEqual({ source: 'posterior', draws: 50, seed: Number(seed) });
  });

  const bad: [string, string][] = [
    ['typo.yaml', `${sc('typo.yaml')}:3:1 (targte): unknown key 'targte'`],
    ['unknown-state.yaml', `${sc('unknown-state.yaml')}:4:10 (target.state): unknown state 'woodland'`],
    ['shares.yaml', `${sc('shares.yaml')}:5:11 (start.shares): starting shares sum to 0.9`],
    ['bad-yaml.yaml', `${sc('bad-yaml.yaml')}:3:1: not valid YAML/JSON`],
    ['bad-csv.yaml', 'test/fixtures/bad-time.csv:3:2: time'],
    ['missing.yaml', `${sc('missing.yaml')}: cannot read the scenario file`],
  ];
  for (const [name, message] of bad) {
    it(`${name}: exit 1 with one line naming file:line:column and key path`, () => {
      const r = sere(['forecast', sc(name)]);
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    });
  }
});
