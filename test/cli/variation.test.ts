import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sere } from './binary.js';

const demo = 'scenarios/brenhollow/no-action.yaml';

describe('year-to-year variation on the command line (built binary)', () => {
  it('a forecast of a record with nine periods prints κ per state and the variation source of the split', () => {
    const r = sere(['forecast', demo, '--draws', '300']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('year-to-year variation estimated');
    expect(r.stdout).toMatch(/rank-grass\s+│\s+—\s+│\s+7\s+│ does not vary: never seen to leave/);
    expect(r.stdout).toContain('without year-to-year variation');
    const j = JSON.parse(sere(['forecast', demo, '--draws', '300', '--json']).stdout);
    expect(j.scenarios[0].variation['rank-grass']).toEqual({ status: 'never-left', kappa: null, informative_periods: 7 });
    expect(j.scenarios[0].uncertainty_split.sources.map((s: { source: string }) => s.source)).toEqual(['matrix', 'variation']);
  });

  it('--variation none prints neither, and the JSON has no variation key', () => {
    const r = sere(['forecast', demo, '--draws', '300', '--variation', 'none', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    expect('variation' in j.scenarios[0]).toBe(false);
    expect(j.scenarios[0].uncertainty_split).toBeNull();
  });

  it('a bad --variation is a usage error (exit 2); estimated on a record of two periods is bad input (exit 1, one line with its place)', () => {
    expect(sere(['forecast', demo, '--variation', 'sometimes']).code).toBe(2);
    const r = sere(['forecast', 'test/fixtures/scenarios/variation-default-none.yaml', '--variation', 'estimated', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_SCENARIO]');
    expect(r.stderr).toContain('(--variation)');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('--variation acts before the draw count is set: a point scenario draws once without it and many times with it', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-variation-'));
    const file = join(dir, 'point.yaml');
    writeFileSync(file, `data: ${join(process.cwd(), 'scenarios/brenhollow/surveys.csv')}\nfit: { states: [mudflat, pioneer, low-marsh, high-marsh, rank-grass], impossible: ['mudflat>high-marsh', 'rank-grass>mudflat'] }\n` +
      'horizon: { steps: 3 }\nuncertainty: { source: point, seed: 5 }\n');
    const drawsOf = (args: string[]): number => JSON.parse(sere(['forecast', file, '--json', ...args]).stdout).scenarios[0].uncertainty.draws;
    expect(drawsOf(['--variation', 'none'])).toBe(1);
    expect(drawsOf(['--variation', 'estimated'])).toBeGreaterThan(1);
  });
});
