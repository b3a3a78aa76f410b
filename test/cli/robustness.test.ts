import { spawnSync } from 'node:child_process';
import { chmodSync, cpSync, mkdtempSync, readdirSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

/** Exit 1 with the error code (printed by --debug) and a place on the one line. */
function expectBadInput(args: string[], code: string, place: string | RegExp): void {
  const r = sere([...args, '--debug']);
  expect(r.code, r.stderr).toBe(1);
  const lines = r.stderr.trimEnd().split('\n');
  expect(lines.length, r.stderr).toBe(1);
  expect(lines[0]).toContain(`[${code}]`);
  if (typeof place === 'string') expect(lines[0]).toContain(place);
  else expect(lines[0]).toMatch(place);
}

const scratch = (): string => mkdtempSync(join(tmpdir(), 'sere-robust-'));

/** A scenario next to a copy of the hand-made survey table. */
function scenario(dir: string, body: string, name = 's.yaml'): string {
  cpSync('test/fixtures/hand.csv', join(dir, 'hand.csv'));
  writeFileSync(join(dir, name), body);
  return join(dir, name);
}
const BASE = 'data: hand.csv\nuncertainty: { source: posterior, draws: 50, seed: 3 }\n';

describe('nasty YAML is bad input, with its place', () => {
  it('an alias naming no anchor', () => {
    const f = scenario(scratch(), `${BASE}horizon: { steps: 5 }\nshow: &a [*b]\n`);
    expectBadInput(['forecast', f], 'BAD_YAML', /s\.yaml:4:\d+/);
  });
  it('an alias inside the value it names (a self-containing list)', () => {
    const f = scenario(scratch(), `${BASE}horizon: { years: &a [*a] }\n`);
    expectBadInput(['forecast', f], 'BAD_YAML', /s\.yaml:3:\d+/);
  });
  it('a failing command prints only its error line, not the seed notice before it', () => {
    const dir = scratch();
    writeFileSync(join(dir, 'p.csv'), 'site,time,state\nA,1,a\nA,2,b\n');
    expectBadInput(['hindcast', join(dir, 'p.csv'), '--state-column', 'nope'], 'MISSING_COLUMN', 'p.csv');
  });
  it('an alias bomb (nested aliases expanding exponentially)', () => {
    const bomb = ['a: &a [x, x, x, x, x, x, x, x, x]'];
    for (const [n, prev] of [['b', 'a'], ['c', 'b'], ['d', 'c'], ['e', 'd'], ['f', 'e']]) bomb.push(`${n}: &${n} [${Array(9).fill(`*${prev}`).join(', ')}]`);
    const f = scenario(scratch(), `${BASE}horizon: { steps: 5 }\n${bomb.join('\n')}\n`);
    expectBadInput(['forecast', f], 'BAD_YAML', /s\.yaml:\d+:\d+/);
  });
});

describe('numbers out of range are refused before any work', () => {
  it('flags: usage errors (exit 2) naming the flag, the same bounds as files', () => {
    for (const args of [
      ['forecast', 'test/fixtures/scenarios/good.yaml', '--seed', '4294967296'],
      ['forecast', 'test/fixtures/scenarios/good.yaml', '--draws', '1000001'],
      ['forecast', 'test/fixtures/scenarios/good.yaml', '--draws', '1e9'],
      ['check', 'test/fixtures/hand.csv', '--horizon', '100000000'],
      ['check', 'test/fixtures/hand.csv', '--replicates', '100001'],
      ['effort', 'test/fixtures/scenarios/good.yaml', '--sites', '1000000000'],
      ['effort', 'test/fixtures/scenarios/good.yaml', '--seasons', '101'],
      ['hindcast', 'test/fixtures/hand.csv', '--years', '1,100000'],
      ['fit', 'test/fixtures/hand.csv', '--step', '0'],
    ]) {
      const r = sere(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(/option '--[a-z]+/);
    }
    expect(sere(['forecast', 'test/fixtures/scenarios/good.yaml', '--seed', '4294967295', '--json']).code).toBe(0);
  });

  it('a horizon beyond the limit, in years or steps, is refused at its key', () => {
    const dir = scratch();
    expectBadInput(['forecast', scenario(dir, `${BASE}horizon: { years: 1000000000 }\n`)], 'BAD_SCENARIO', '(horizon.years)');
    expectBadInput(['forecast', scenario(dir, `${BASE}horizon: { years: 4294967295 }\n`)], 'BAD_SCENARIO', '(horizon.years)');
    expectBadInput(['forecast', scenario(dir, `${BASE}horizon: { steps: 1001 }\n`)], 'BAD_SCENARIO', 's.yaml:3');
  });

  it('a run that would not fit in memory is refused with the estimate, before allocating', () => {
    // 30 states: the matrix draws alone are 1,000,000 × 30² doubles (7.2 GB).
    const dir = scratch();
    const rows = ['site,time,state'];
    for (let site = 0; site < 60; site++) rows.push(`p${site},2000,s${site % 30}`, `p${site},2001,s${(site + 1) % 30}`);
    writeFileSync(join(dir, 'many.csv'), rows.join('\n') + '\n');
    const f = scenario(dir, 'data: many.csv\nuncertainty: { source: posterior, draws: 1000000, seed: 3 }\nhorizon: { steps: 10 }\n');
    const r = sere(['forecast', f, '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[TOO_LARGE]');
    expect(r.stderr).toMatch(/about \d+(\.\d)? GB/);
    expect(r.stderr).toContain('(uncertainty.draws)');
  });
});

describe('commands given the wrong kind of input', () => {
  it('effort on a file with alternatives names the key', () => {
    const f = scenario(scratch(), `${BASE}horizon: { steps: 5 }\nalternatives:\n  - name: a\n  - name: b\n`);
    expectBadInput(['effort', f], 'BAD_SCENARIO', '(alternatives)');
  });
  it('init on an existing file, and on a non-empty folder, writes nothing', () => {
    const dir = scratch();
    const file = join(dir, 'taken');
    writeFileSync(file, 'mine');
    expectBadInput(['init', file], 'FILE_EXISTS', file);
    expect(readFileSync(file, 'utf8')).toBe('mine');
    expectBadInput(['init', dir], 'FILE_EXISTS', dir);
  });
  it('fit --by with two groups that would share a file name writes nothing', () => {
    const dir = scratch();
    writeFileSync(join(dir, 'g.csv'), 'site,time,state,zone\nA,1,a,x y\nA,2,b,x y\nB,1,b,x_y\nB,2,a,x_y\n');
    expectBadInput(['fit', join(dir, 'g.csv'), '--by', 'zone', '--out', join(dir, 'out.json')], 'BAD_OPTION', 'g.csv');
    expect(readdirSync(dir)).toEqual(['g.csv']);
  });
});

/** A light demo workspace (50 draws, one scenario file and the comparison). */
function workspace(): string {
  const dir = join(scratch(), 'ws');
  expect(sere(['init', dir]).code).toBe(0);
  for (const name of ['no-action.yaml', 'storm-surges.yaml', 'options.yaml']) {
    const file = join(dir, 'scenarios', name);
    writeFileSync(file, readFileSync(file, 'utf8').replace('draws: 4000', 'draws: 50'));
  }
  return dir;
}
const wsFile = (dir: string): string => join(dir, 'sere-workspace.yaml');
const editWorkspace = (dir: string, from: string | RegExp, to: string): void =>
  writeFileSync(wsFile(dir), readFileSync(wsFile(dir), 'utf8').replace(from, to));

describe('workspaces and records', () => {
  it('refuses scenario files whose record names would collide, and paths with control characters', () => {
    const dir = workspace();
    cpSync(join(dir, 'scenarios', 'no-action.yaml'), join(dir, 'scenarios-no-action.yaml'));
    editWorkspace(dir, '  - scenarios/options.yaml', '  - scenarios/options.yaml\n  - scenarios-no-action.yaml');
    expectBadInput(['season', dir], 'BAD_WORKSPACE', /sere-workspace\.yaml:\d+:\d+ \(scenarios\[3\]\)/);
    const other = workspace();
    editWorkspace(other, 'records: records', 'records: "rec\\0ords"');
    expectBadInput(['season', other], 'BAD_WORKSPACE', '(records)');
  });

  it('refuses a records path naming a file', () => {
    const dir = workspace();
    writeFileSync(join(dir, 'records'), 'not a folder');
    expectBadInput(['season', dir], 'BAD_WORKSPACE', join(dir, 'records'));
  });

  it('skips an edited earlier record with a warning, and scores and compares with the last good one', () => {
    const base = workspace();
    editWorkspace(base, /  - scenarios\/storm-surges.yaml\n  - scenarios\/options.yaml\n/, '');
    expect(sere(['season', base, '--date', '2025-01-01']).code).toBe(0);
    expect(sere(['season', base, '--date', '2025-02-01']).code).toBe(0);
    const variants = ['fit.json', 'manifest.json', 'forecasts/scenarios-no-action.json']
      .flatMap((file) => ['{}', 'null', '[]', '{"scenarios":[{"name":"x"}]}', '{"states":"constructor"}'].map((text) => [file, text] as const));
    for (const [file, text] of variants) {
      const dir = join(scratch(), 'ws');
      cpSync(base, dir, { recursive: true });
      writeFileSync(join(dir, 'records', '2025-02-01', file), text);
      const r = sere(['season', dir, '--date', '2025-03-01']);
      expect(r.code, `${file} = ${text}: ${r.stderr}`).toBe(0);
      expect(r.stderr).toContain('skipped record 2025-02-01');
      expect(r.stderr).toContain(file);
      const manifest = JSON.parse(readFileSync(join(dir, 'records', '2025-03-01', 'manifest.json'), 'utf8'));
      expect(manifest.previous).toBe('2025-01-01');
    }
    // 17 seasons of about 4 s CPU each: 90 s was too little on a loaded machine (124 s measured at load 13).
  }, 240_000);

  it('refuses to replay a record whose manifest holds seed 0, naming the file and key', () => {
    const dir = workspace();
    expect(sere(['season', dir, '--date', '2025-01-01']).code).toBe(0);
    const record = join(dir, 'records', '2025-01-01');
    const manifest = join(record, 'manifest.json');
    writeFileSync(manifest, readFileSync(manifest, 'utf8').replace(/"seed": \d+/, '"seed": 0'));
    expectBadInput(['season', '--replay', record], 'BAD_RECORD', /manifest\.json \(scenarios\[0\]\.seed\)/);
  });

  it('takes a lock: a live run blocks a second one; a stale lock and leftover temporary folders are cleared', () => {
    const dir = workspace();
    mkdirSync(join(dir, 'records'));
    writeFileSync(join(dir, 'records', '.sere-season.lock'), `${process.pid} 2026-01-01T00:00:00Z\n`);
    expectBadInput(['season', dir], 'BUSY', '.sere-season.lock');
    writeFileSync(join(dir, 'records', '.sere-season.lock'), '999999999 2026-01-01T00:00:00Z\n');
    mkdirSync(join(dir, 'records', '.abc-123.tmp'));
    writeFileSync(join(dir, 'records', '.abc-123.tmp', 'half.json'), '{');
    const r = sere(['season', dir, '--date', '2025-01-01']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('no longer running');
    expect(r.stderr).toContain('removed 1 unfinished record folder');
    expect(readdirSync(join(dir, 'records'))).toEqual(['2025-01-01']);
  });

  it('reports a read-only records folder as read-only', (ctx) => {
    const dir = workspace();
    const records = join(dir, 'records');
    mkdirSync(records);
    // Root ignores permission bits; the immutable attribute (chattr +i, ext4) stops root too.
    const asRoot = process.getuid?.() === 0;
    const lock = (on: boolean): boolean => (asRoot
      ? spawnSync('chattr', [on ? '+i' : '-i', records]).status === 0
      : (chmodSync(records, on ? 0o555 : 0o755), true));
    if (!lock(true)) {
      console.warn('skipped: running as root without chattr, so no folder can be made read-only');
      ctx.skip();
    }
    try {
      const r = sere(['season', dir, '--debug']);
      expect(r.code, r.stderr).toBe(1);
      expect(r.stderr).toContain('[CANNOT_WRITE]');
      expect(r.stderr).toContain('read-only');
    } finally {
      lock(false);
    }
    expect(readdirSync(records)).toEqual([]);
  });
});

describe('errors in a scenario fit block name the scenario key, not a flag', () => {
  it('an impossible transition naming an unknown state', () => {
    const f = scenario(scratch(), `${BASE}fit:\n  impossible: [a>nope]\nhorizon: { steps: 5 }\n`);
    expectBadInput(['forecast', f], 'UNKNOWN_STATE', /s\.yaml:4:\d+ \(fit\.impossible\)/);
  });
  it('a state listed twice in fit.states', () => {
    const f = scenario(scratch(), `${BASE}fit:\n  states: [a, a, b, c]\nhorizon: { steps: 5 }\n`);
    expectBadInput(['forecast', f], 'BAD_OPTION', /s\.yaml:4:\d+ \(fit\.states\)/);
  });
  it('data naming a folder, or a missing file', () => {
    const dir = scratch();
    expectBadInput(['forecast', scenario(dir, 'data: "."\nhorizon: { steps: 5 }\n')], 'BAD_SCENARIO', /s\.yaml:1:7 \(data\)/);
    mkdirSync(join(dir, 'sub'));
    expectBadInput(['forecast', scenario(dir, 'data: sub\nhorizon: { steps: 5 }\n')], 'BAD_SCENARIO', /s\.yaml:1:7 \(data\)/);
    expectBadInput(['forecast', scenario(dir, 'data: gone.csv\nhorizon: { steps: 5 }\n')], 'BAD_SCENARIO', /s\.yaml:1:7 \(data\)/);
  });
});
