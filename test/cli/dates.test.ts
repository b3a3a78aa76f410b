import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

describe('dated surveys (built binary)', () => {
  it('sere fit --step 1y fits the dated heath table and reports the rounding in the JSON', () => {
    const r = sere(['fit', 'test/fixtures/heath/surveys-dated.csv', '--step', '1y', '--seed', '2', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.step).toBe(1);
    expect(json.seasons).toMatchObject({ dates: 1320, other_year: 0 });
    expect(json.data.pairs_by_gap.map((p: { gap: number }) => p.gap)).toEqual([1, 2, 3, 5]);
    expect(json.posterior_sampler).toMatchObject({ seed: 2, chains: 4, warm_up: 500, thin: 2, retained: 1000 });
  });

  it('a scenario with fit: { step: 1y } forecasts from the dated table, carrying forward the sites missed in the last season', () => {
    const r = sere(['forecast', 'test/fixtures/scenarios/heath-dated.yaml', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout).scenarios[0];
    expect(s.years[0]).toBe(2024);
    expect(s.start.carried.reduce((n: number, c: { sites: number }) => n + c.sites, 0)).toBe(18);
  });

  it('--step 1x is a usage error (exit 2)', () => {
    expect(sere(['fit', 'test/fixtures/heath/surveys-dated.csv', '--step', '1x']).code).toBe(2);
  });
});
