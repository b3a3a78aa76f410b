import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';

// The invented heath surveys by two observers, and an accuracy assessment with one matrix each (scripts/heath-fixture.ts).
const SURVEYS = 'test/fixtures/heath/surveys-two-observers.csv';
const ACCURACY = 'test/fixtures/heath/accuracy-by-observer.csv';
const code = (stderr: string): string | undefined => /\[([A-Z_]+)\]/.exec(stderr)?.[1];

describe('recorded-scale scoring with one error matrix per observer (built binary)', () => {
  it('sere hindcast --errors is refused in one line at --errors', () => {
    const r = sere(['hindcast', SURVEYS, '--errors', ACCURACY, '--impossible', 'mature-heath>bare-peat', '--years', '1', '--seed', '3', '--debug']);
    expect(r.code).toBe(1);
    expect(code(r.stderr)).toBe('BAD_OPTION');
    expect(r.stderr).toContain('--errors');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stdout).toBe('');
  }, 120_000);

  it('a second season (scoring the first record) is refused in one line at fit.errors, writing no record', () => {
    const root = mkdtempSync(join(tmpdir(), 'sere-ws-observers-'));
    const [header, ...rows] = readFileSync(SURVEYS, 'utf8').trim().split('\n');
    const year = (line: string): number => Number(line.split(',')[1]);
    writeFileSync(join(root, 'to-2022.csv'), [header, ...rows.filter((l) => year(l) <= 2022)].join('\n') + '\n');
    const dir = join(root, 'ws');
    expect(sere(['init', dir, '--from', join(root, 'to-2022.csv'), '--errors', ACCURACY]).code).toBe(0);
    writeFileSync(join(dir, 'surveys', 'new.csv'), [header, ...rows.filter((l) => year(l) > 2022)].join('\n') + '\n');
    const scenario = join(dir, 'scenarios', 'do-nothing.yaml');
    writeFileSync(scenario, readFileSync(scenario, 'utf8').replace('draws: 4000', 'draws: 200'));
    expect(sere(['season', dir, '--date', '2025-01-01']).code).toBe(0);
    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('  - surveys/to-2022.csv', '  - surveys/to-2022.csv\n  - surveys/new.csv'));
    const r = sere(['season', dir, '--date', '2025-09-30', '--debug']);
    expect(r.code).toBe(1);
    expect(code(r.stderr)).toBe('BAD_OPTION');
    expect(r.stderr).toContain('sere-workspace.yaml');
    expect(r.stderr).toContain('fit.errors');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(join(dir, 'records', '2025-09-30'))).toBe(false);
  }, 300_000);
});
