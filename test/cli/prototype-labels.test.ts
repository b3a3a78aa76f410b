import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sereInProcess } from './in-process.js';

const sere = sereInProcess;

// Labels that are members of Object.prototype: wherever a label became a key of a plain object,
// these read inherited functions instead of data. Every command must treat them as plain states.
const NAMES = ['__proto__', 'constructor', 'hasOwnProperty', 'toString', 'valueOf'];

/** 20 sites × 6 surveys in which every state leaves and is reached, with two zones. */
function table(dir: string): string {
  const rows = Array.from({ length: 20 }, (_, s) => Array.from({ length: 6 }, (_, t) =>
    `S${s},${2000 + t},${NAMES[(s + t * ((s % 4) + 1)) % 5]},${NAMES[s % 2]}`)).flat();
  const file = join(dir, 'p.csv');
  writeFileSync(file, `site,time,state,zone\n${rows.join('\n')}\n`);
  return file;
}

const SCENARIO = [
  'uncertainty: { draws: 60, seed: 5 }',
  'horizon: { years: 6 }',
  'plots: latest',
  'target: { state: constructor, share: 0.3 }',
  'alternatives:',
  '  - name: nothing',
  '  - name: nudge',
  '    treatments: [{ name: t, state: valueOf, multiply: { hasOwnProperty: 1.2 } }]',
].join('\n') + '\n';

describe('states named like Object.prototype members, in every command', () => {
  it('check, hindcast, compare, effort and season all run and keep every state', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-proto-'));
    const csv = table(dir);
    const check = await sere(['check', csv, '--group-column', 'zone', '--target', 'toString', '--horizon', '5', '--seed', '2', '--draws', '100', '--json']);
    expect(check.code, check.stderr).toBe(0);
    expect(JSON.parse(check.stdout).states).toEqual(NAMES);

    const hind = await sere(['hindcast', csv, '--years', '1,2', '--draws', '50', '--seed', '3', '--json']);
    expect(hind.code, hind.stderr).toBe(0);
    expect(JSON.parse(hind.stdout).summary.length).toBe(2);

    writeFileSync(join(dir, 'options.yaml'), `data: p.csv\n${SCENARIO}`);
    const compare = await sere(['compare', join(dir, 'options.yaml'), '--json']);
    expect(compare.code, compare.stderr).toBe(0);
    const baseline = JSON.parse(compare.stdout).baseline;
    expect(Object.keys(baseline.shares)).toEqual(NAMES);

    writeFileSync(join(dir, 'one.yaml'), `data: p.csv\n${SCENARIO.split('alternatives:')[0]}`);
    const effort = await sere(['effort', join(dir, 'one.yaml'), '--sites', '10', '--seasons', '1', '--replicates', '2', '--draws', '50', '--seed', '4', '--json']);
    expect(effort.code, effort.stderr).toBe(0);
    expect(Object.keys(JSON.parse(effort.stdout).current)).toEqual(NAMES);

    const ws = join(dir, 'ws');
    mkdirSync(join(ws, 'scenarios'), { recursive: true });
    writeFileSync(join(ws, 'p.csv'), readFileSync(csv));
    writeFileSync(join(ws, 'scenarios', 'options.yaml'), SCENARIO);
    writeFileSync(join(ws, 'sere-workspace.yaml'), 'name: prototype names\nsurveys: [p.csv]\nscenarios: [scenarios/options.yaml]\nfit: { columns: { group: zone } }\n');
    const first = await sere(['season', ws, '--date', '2026-01-01']);
    expect(first.code, first.stderr).toBe(0);
    const second = await sere(['season', ws, '--date', '2026-02-01']);
    expect(second.code, second.stderr).toBe(0);
    expect(second.stderr).not.toContain('skipped record');
    const forecasts = JSON.parse(readFileSync(join(ws, 'records', '2026-02-01', 'forecasts', 'scenarios-options.json'), 'utf8'));
    expect(Object.keys(forecasts.scenarios[0].shares)).toEqual(NAMES);
  }, 60_000);
});
