import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

// A scenario file inside a workspace that names no data runs on the workspace's surveys and fit
// block (cli/workspace-scenario.ts), as `sere season` runs it: the same seed, the same sampler run,
// so the forecast is the record's, byte for byte apart from the file's path.

/** The demo workspace with 300 draws a scenario, and no sample cache (the sampler runs each time). */
function workspace(): string {
  const dir = join(mkdtempSync(join(tmpdir(), 'sere-wsrun-')), 'brenhollow');
  expect(sere(['init', dir]).code).toBe(0);
  for (const name of ['no-action.yaml', 'options.yaml']) {
    const file = join(dir, 'scenarios', name);
    writeFileSync(file, readFileSync(file, 'utf8').replace('draws: 4000', 'draws: 300'));
  }
  return dir;
}

const OFF = { SERE_CACHE: 'off' };

/** A JSON output without the scenario file's path, which the record keeps relative to the workspace. */
const withoutFile = (text: string): string => text.replace(/"file": "[^"]*"/g, '"file": ""');

describe('a workspace scenario run by forecast, compare and effort (built binary)', () => {
  it('gives the season record\'s forecast and comparison', () => {
    const dir = workspace();
    expect(sere(['season', dir, '--date', '2026-03-01'], OFF).code).toBe(0);
    const record = join(dir, 'records', '2026-03-01');
    const forecast = sere(['forecast', join(dir, 'scenarios', 'no-action.yaml'), '--json'], OFF);
    expect(forecast.code).toBe(0);
    expect(forecast.stderr).toContain('sere-workspace.yaml');
    expect(withoutFile(forecast.stdout)).toBe(withoutFile(readFileSync(join(record, 'forecasts', 'scenarios-no-action.json'), 'utf8')));
    const compare = sere(['compare', join(dir, 'scenarios', 'options.yaml'), '--json'], OFF);
    expect(compare.code).toBe(0);
    expect(withoutFile(compare.stdout)).toBe(withoutFile(readFileSync(join(record, 'comparisons', 'scenarios-options.json'), 'utf8')));
    const effort = sere(['effort', join(dir, 'scenarios', 'no-action.yaml'), '--replicates', '2', '--seasons', '1', '--sites', '60', '--draws', '50', '--json'], OFF);
    expect(effort.code).toBe(0);
    expect(JSON.parse(effort.stdout).seed).toBe(20261201);
  });

  it('takes the workspace\'s seed for a file naming none, and its own data when it names some', () => {
    const dir = workspace();
    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, `${readFileSync(wsFile, 'utf8')}seed: 77\n`);
    const unseeded = readFileSync(join(dir, 'scenarios', 'no-action.yaml'), 'utf8').replace(/^ *seed: .*\n/m, '');
    writeFileSync(join(dir, 'scenarios', 'draft.yaml'), unseeded);
    const draft = sere(['forecast', join(dir, 'scenarios', 'draft.yaml'), '--json'], OFF);
    expect(draft.code).toBe(0);
    expect(draft.stderr).not.toContain('no seed given');
    expect(JSON.parse(draft.stdout).scenarios[0].uncertainty.seed).toBe(77);
    // Its own data: the workspace is not consulted (no notice).
    writeFileSync(join(dir, 'scenarios', 'own.yaml'), `data: ../surveys/brenhollow-2015-2024.csv\n${unseeded}`);
    const own = sere(['forecast', join(dir, 'scenarios', 'own.yaml'), '--seed', '5'], OFF);
    expect(own.code).toBe(0);
    expect(own.stderr).not.toContain('sere-workspace.yaml');
  });

  it('a scenario naming no data in no workspace is bad input at its data key', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-nows-'));
    writeFileSync(join(dir, 'lone.yaml'), 'name: lone\nhorizon: { years: 5 }\n');
    const r = sere(['--debug', 'forecast', join(dir, 'lone.yaml')], OFF);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^sere: error \[BAD_SCENARIO\]: \S*lone\.yaml:\d+:\d+ \(data\)/);
  });
});
