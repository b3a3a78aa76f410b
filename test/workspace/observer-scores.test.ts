import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';

// The invented heath surveys by two observers, and an accuracy assessment with one matrix each (scripts/heath-fixture.ts).
const SURVEYS = 'test/fixtures/heath/surveys-two-observers.csv';
const ACCURACY = 'test/fixtures/heath/accuracy-by-observer.csv';

const json = (path: string): any => JSON.parse(readFileSync(path, 'utf8')); // eslint-disable-line @typescript-eslint/no-explicit-any

describe('recorded-scale scoring with one error matrix per observer (built binary)', () => {
  it('sere hindcast --errors scores on the recorded scale, each survey through its observer\'s matrix (not the pooled one)', () => {
    const args = ['hindcast', SURVEYS, '--impossible', 'mature-heath>bare-peat', '--years', '1', '--draws', '200', '--seed', '3', '--json'];
    const r = sere([...args, '--errors', ACCURACY]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.summary[0].scale).toBe('recorded');
    expect(out.summary[0].sites).toBeGreaterThan(1000);
    // The same surveys with the observers pooled (the assessment without its observer column) score differently.
    const pooledFile = join(mkdtempSync(join(tmpdir(), 'sere-pooled-')), 'accuracy.csv');
    const rows = readFileSync(ACCURACY, 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    const sums = new Map<string, number>();
    for (const [, recorded, verified, n] of rows) sums.set(`${recorded},${verified}`, (sums.get(`${recorded},${verified}`) ?? 0) + Number(n));
    writeFileSync(pooledFile, ['recorded,verified,n', ...[...sums].map(([key, n]) => `${key},${n}`)].join('\n') + '\n');
    const pooled = JSON.parse(sere([...args, '--errors', pooledFile]).stdout);
    expect(pooled.summary[0].scale).toBe('recorded');
    expect(Math.abs(pooled.summary[0].chain.log - out.summary[0].chain.log)).toBeGreaterThan(1e-4);
  }, 300_000);

  it('a workspace whose surveys name observers: two seasons, the first record scored as recorded by the second, both replayed identically', () => {
    const root = mkdtempSync(join(tmpdir(), 'sere-ws-observers-'));
    const [header, ...rows] = readFileSync(SURVEYS, 'utf8').trim().split('\n');
    const year = (line: string): number => Number(line.split(',')[1]);
    writeFileSync(join(root, 'to-2022.csv'), [header, ...rows.filter((l) => year(l) <= 2022)].join('\n') + '\n');
    const dir = join(root, 'ws');
    expect(sere(['init', dir, '--from', join(root, 'to-2022.csv'), '--errors', ACCURACY]).code).toBe(0);
    writeFileSync(join(dir, 'surveys', 'new.csv'), [header, ...rows.filter((l) => year(l) > 2022)].join('\n') + '\n');
    const scenario = join(dir, 'scenarios', 'do-nothing.yaml');
    writeFileSync(scenario, readFileSync(scenario, 'utf8').replace('draws: 4000', 'draws: 200'));
    const first = sere(['season', dir, '--date', '2025-01-01']);
    expect(first.code).toBe(0);
    const one = join(dir, 'records', '2025-01-01');
    const fit = json(join(one, 'fit.json'));
    expect(fit.error_model.observers.map((o: { name: string }) => o.name)).toEqual(['Avery', 'Corran']);
    expect(fit.posterior_sampler.observer_error_matrices.length).toBe(fit.posterior_sampler.retained);
    expect(sere(['season', '--replay', one]).code).toBe(0);

    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('  - surveys/to-2022.csv', '  - surveys/to-2022.csv\n  - surveys/new.csv'));
    const second = sere(['season', dir, '--date', '2025-09-30']);
    expect(second.stderr).toBe('');
    expect(second.code).toBe(0);
    expect(second.stdout).toContain('scored on the recorded scale');
    const two = join(dir, 'records', '2025-09-30');
    const scores = json(join(two, 'scores.json')).records[0];
    expect(scores.record).toBe('2025-01-01');
    expect(scores.summary.scale).toBe('recorded');
    expect(scores.years.map((y: { year: number }) => y.year)).toEqual([2023, 2024]);
    for (const y of scores.years) {
      expect(y.scale).toBe('recorded');
      expect(y.origin).toBe(2022);
      expect(y.sites).toBe(rows.filter((l) => year(l) === y.year).length - y.unscored);
      expect(y.observed.reduce((a: number, b: number) => a + b, 0)).toBe(y.sites);
    }
    expect(scores.summary.coverage.bands).toBe(2 * 5);
    const replay = sere(['season', '--replay', two]);
    expect(replay.stdout).toContain('files identical');
    expect(replay.code).toBe(0);
    expect(existsSync(join(two, 'scores.csv')) || existsSync(join(two, 'scores.json'))).toBe(true);
  }, 600_000);
});
