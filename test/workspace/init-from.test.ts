import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';

const fresh = (): string => join(mkdtempSync(join(tmpdir(), 'sere-init-')), 'my-site');

describe('sere init --from (built binary)', () => {
  it('starts a workspace from a survey table that a season then runs', () => {
    const dir = fresh();
    const r = sere(['init', dir, '--from', 'test/fixtures/hand.csv', '--impossible', 'a>c', '--prior', 'uniform']);
    expect(r.code).toBe(0);
    const ws = parse(readFileSync(join(dir, 'sere-workspace.yaml'), 'utf8'));
    expect(ws.name).toBe('my-site');
    expect(ws.fit).toEqual({ step: 1, prior: 'uniform', states: ['a', 'b', 'c'], impossible: ['a>c'] });
    expect(ws.seed).toBeGreaterThanOrEqual(1);
    expect(readFileSync(join(dir, ws.surveys[0]))).toEqual(readFileSync('test/fixtures/hand.csv'));
    const scenarioFile = join(dir, ws.scenarios[0]);
    const scenario = parse(readFileSync(scenarioFile, 'utf8'));
    expect(scenario.start).toBe('latest');
    expect(scenario.horizon).toEqual({ years: 20 });
    writeFileSync(scenarioFile, readFileSync(scenarioFile, 'utf8').replace('draws: 4000', 'draws: 200'));

    expect(sere(['season', dir, '--date', '2025-01-01']).code).toBe(0);
    const record = join(dir, 'records', '2025-01-01');
    const forecast = JSON.parse(readFileSync(join(record, 'forecasts', 'scenarios-do-nothing.json'), 'utf8')).scenarios[0];
    expect(forecast.start.from).toBe('latest');
    expect(forecast.years[forecast.years.length - 1] - forecast.years[0]).toBe(20);
    expect(forecast.uncertainty.seed).toBe(ws.seed);
    // The fit honours the flags: a>c is a structural zero.
    const fit = JSON.parse(readFileSync(join(record, 'fit.json'), 'utf8'));
    expect(fit.probabilities[0][2]).toBe(0);
    expect(existsSync(join(record, 'report.html'))).toBe(true);
  });

  it('rounds the 20-year horizon to whole steps and states inferred labels in order', () => {
    const dir = fresh();
    expect(sere(['init', dir, '--from', 'test/fixtures/five-year.csv', '--step', '5']).code).toBe(0);
    const ws = parse(readFileSync(join(dir, 'sere-workspace.yaml'), 'utf8'));
    expect(ws.fit.step).toBe(5);
    expect(parse(readFileSync(join(dir, 'scenarios', 'do-nothing.yaml'), 'utf8')).horizon).toEqual({ years: 20 });
    const grouped = fresh();
    expect(sere(['init', grouped, '--from', 'test/fixtures/grouped.csv', '--group-column', 'soil']).code).toBe(0);
    expect(parse(readFileSync(join(grouped, 'sere-workspace.yaml'), 'utf8')).fit.columns).toEqual({ group: 'soil' });
  });

  it('bad input: one line naming the place, exit 1, nothing written', () => {
    for (const args of [['--from', 'test/fixtures/ragged.csv'], ['--from', 'test/fixtures/hand.csv', '--states', 'a,b'],
      ['--from', 'test/fixtures/no-such.csv'], ['--from', 'test/fixtures/five-year.csv']]) {
      const dir = fresh();
      const r = sere(['init', dir, ...args, '--debug']);
      expect(r.code, args.join(' ')).toBe(1);
      expect(r.stderr.trim().split('\n').length).toBe(1);
      expect(r.stderr).toContain('test/fixtures/');
      expect(existsSync(dir)).toBe(false);
    }
    // The ragged row is on line 3.
    expect(sere(['init', fresh(), '--from', 'test/fixtures/ragged.csv']).stderr).toContain(':3');
  });

  it('fit flags without --from are a usage error, and nothing is written', () => {
    const dir = fresh();
    expect(sere(['init', dir, '--step', '5']).code).toBe(2);
    expect(existsSync(dir)).toBe(false);
  });
});
