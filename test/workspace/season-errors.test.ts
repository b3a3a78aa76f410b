import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';
import { loadWorkspace } from '../../src/workspace/workspace.js';
import { SereError } from '../../src/errors.js';

// The invented heath surveys, recorded by observers of whom one mislabels young heath as grassland,
// and their accuracy assessment (scripts/heath-fixture.ts).
const SURVEYS = 'test/fixtures/heath/surveys.csv';
const ACCURACY = 'test/fixtures/heath/accuracy.csv';

/** A workspace from the surveys up to 2022 with the error table, and the 2023–2024 surveys beside it for a later season. */
function workspace(): string {
  const root = mkdtempSync(join(tmpdir(), 'sere-ws-errors-'));
  const [header, ...rows] = readFileSync(SURVEYS, 'utf8').trim().split('\n');
  const year = (line: string): number => Number(line.split(',')[1]);
  writeFileSync(join(root, 'to-2022.csv'), [header, ...rows.filter((l) => year(l) <= 2022)].join('\n') + '\n');
  const dir = join(root, 'quillanmoor');
  const r = sere(['init', dir, '--from', join(root, 'to-2022.csv'), '--errors', ACCURACY]);
  expect(r.stderr).toContain('seed');
  expect(r.code).toBe(0);
  writeFileSync(join(dir, 'surveys', 'new-2023-2024.csv'), [header, ...rows.filter((l) => year(l) > 2022)].join('\n') + '\n');
  const scenario = join(dir, 'scenarios', 'do-nothing.yaml');
  writeFileSync(scenario, readFileSync(scenario, 'utf8').replace('draws: 4000', 'draws: 200'));
  return dir;
}

const json = (path: string): any => JSON.parse(readFileSync(path, 'utf8')); // eslint-disable-line @typescript-eslint/no-explicit-any

describe('a workspace with an error table (built binary)', () => {
  it('copies and hashes the table like the surveys, scores later surveys on the recorded scale, and reports a changed table', () => {
    const dir = workspace();
    const ws = parse(readFileSync(join(dir, 'sere-workspace.yaml'), 'utf8'));
    expect(ws.fit.errors).toBe('surveys/accuracy.csv');
    expect(readFileSync(join(dir, 'surveys', 'accuracy.csv'))).toEqual(readFileSync(ACCURACY));

    const first = sere(['season', dir, '--date', '2025-01-01']);
    expect(first.stderr).toBe('');
    expect(first.code).toBe(0);
    const one = join(dir, 'records', '2025-01-01');
    expect(json(join(one, 'manifest.json')).contents).toContain('inputs/surveys/accuracy.csv');
    expect(readFileSync(join(one, 'inputs', 'surveys', 'accuracy.csv'))).toEqual(readFileSync(ACCURACY));
    const fit = json(join(one, 'fit.json'));
    // Named as the workspace names it (so a replay from inputs/ writes the same file), with the sampler's error sweeps kept.
    expect(fit.error_model.file).toBe('surveys/accuracy.csv');
    expect(fit.posterior_sampler.error_matrices.length).toBe(fit.posterior_sampler.retained);
    const forecast = json(join(one, 'forecasts', 'scenarios-do-nothing.json')).scenarios[0];
    expect(Object.keys(forecast.start.recorded_shares)).toEqual(fit.states);
    const replay = sere(['season', '--replay', one]);
    expect(replay.stdout).toContain('files identical');
    expect(replay.code).toBe(0);

    // Next season: 2023 and 2024 surveyed; the first record is scored against them as recorded.
    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('  - surveys/to-2022.csv', '  - surveys/to-2022.csv\n  - surveys/new-2023-2024.csv'));
    const second = sere(['season', dir, '--date', '2025-09-30']);
    expect(second.code).toBe(0);
    expect(second.stdout).toContain('error table unchanged');
    expect(second.stdout).toContain('scored on the recorded scale');
    const two = join(dir, 'records', '2025-09-30');
    const scores = json(join(two, 'scores.json')).records[0];
    expect(scores.record).toBe('2025-01-01');
    expect(scores.summary.scale).toBe('recorded');
    expect(scores.years.map((y: { year: number }) => y.year)).toEqual([2023, 2024]);
    for (const y of scores.years) {
      expect(y.scale).toBe('recorded');
      expect(y.origin).toBe(2022);
      expect(y.observed.reduce((a: number, b: number) => a + b, 0)).toBe(y.sites);
    }
    expect(scores.summary.coverage.bands).toBe(2 * 5);
    const changes = json(join(two, 'changes.json'));
    expect(changes.dataChanged).toBe(true);
    expect(changes.error_table).toEqual({ before: fit.error_model.sha256, now: fit.error_model.sha256, changed: false });
    // With an error table the move is not split (each draw starts from its own true mix).
    expect(changes.forecasts.every((f: { newData: unknown }) => f.newData === null)).toBe(true);
    expect(sere(['season', '--replay', two]).code).toBe(0);

    // A new accuracy assessment: the season says the table changed, and the fit records the new hash.
    const table = join(dir, 'surveys', 'accuracy.csv');
    writeFileSync(table, readFileSync(table, 'utf8').replace('grassland,young-heath,3', 'grassland,young-heath,9'));
    const third = sere(['season', dir, '--date', '2026-01-01']);
    expect(third.code).toBe(0);
    expect(third.stdout).toContain('error table changed');
    const three = join(dir, 'records', '2026-01-01');
    const after = json(join(three, 'changes.json')).error_table;
    expect(after.changed).toBe(true);
    expect(after.before).toBe(fit.error_model.sha256);
    expect(after.now).toBe(json(join(three, 'fit.json')).error_model.sha256);
    expect(after.now).not.toBe(after.before);
  }, 600_000);

  it('a missing error table stops the season in one line naming fit.errors, writing no record', () => {
    const dir = workspace();
    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('errors: surveys/accuracy.csv', 'errors: surveys/nowhere.csv'));
    const r = sere(['season', dir, '--date', '2025-01-01', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[FILE_NOT_FOUND]');
    expect(r.stderr).toContain('fit.errors');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(join(dir, 'records', '2025-01-01'))).toBe(false);
  }, 120_000);

  it('an error table outside the workspace is refused at fit.errors with its line (a record could not copy it)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-ws-outside-'));
    writeFileSync(join(dir, 'sere-workspace.yaml'), ['name: outside', 'surveys: [s.csv]', 'fit: { errors: ../accuracy.csv }', 'scenarios: [a.yaml]'].join('\n') + '\n');
    let caught: unknown;
    try {
      loadWorkspace(dir);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(SereError);
    const err = caught as SereError;
    expect(err.code).toBe('BAD_WORKSPACE');
    expect(err.place.path).toBe('fit.errors');
    expect(err.place.line).toBe(3);
  });
});
