import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sereInProcess } from './in-process.js';

const sere = sereInProcess;

const dir = (): string => mkdtempSync(join(tmpdir(), 'sere-input-'));

function badInput(r: { code: number; stdout: string; stderr: string }, contains: string): void {
  expect(r.code, r.stderr).toBe(1);
  expect(r.stdout).toBe('');
  expect(r.stderr.endsWith('\n')).toBe(true);
  expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
  expect(r.stderr).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f]/);
  expect(r.stderr).toContain(contains);
}

/** A fit file and a scenario using it, the fit edited by `edit`. */
async function editedFit(edit: (fit: Record<string, any>) => void): Promise<string> { // eslint-disable-line @typescript-eslint/no-explicit-any
  const d = dir();
  expect((await sere(['fit', 'test/fixtures/hand.csv', '--out', join(d, 'fit.json')])).code).toBe(0);
  const fit = JSON.parse(readFileSync(join(d, 'fit.json'), 'utf8'));
  edit(fit);
  writeFileSync(join(d, 'fit.json'), JSON.stringify(fit, null, 2));
  writeFileSync(join(d, 's.yaml'), 'data: fit.json\nuncertainty: { draws: 50, seed: 1 }\nhorizon: { steps: 3 }\n');
  return join(d, 's.yaml');
}

describe('edited fit files (found by an outside campaign)', () => {
  it('latest counts that disagree with the site count: exit 1 naming latest.sites, not 1800 % and exit 0', async () => {
    badInput(await sere(['forecast', await editedFit((f) => { f.latest.counts = [0, 0, 18]; })]), '(latest.sites)');
  });

  it('a state listed twice: exit 1 naming states[1], not mean shares summing to 0.87', async () => {
    badInput(await sere(['forecast', await editedFit((f) => { f.states[1] = f.states[0]; })]), '(states[1])');
  });
});

describe('survey tables', () => {
  it('a time with 400 digits: exit 1 at file:line:column', async () => {
    const file = join(dir(), 's.csv');
    writeFileSync(file, `site,time,state\nA,1,a\nA,${'9'.repeat(400)},b\n`);
    badInput(await sere(['fit', file]), `${file}:3:2: time '${'9'.repeat(57)}…'`);
  });

  it('times near 2^53 fit, but a horizon past it is refused instead of printing rounded years', async () => {
    const d = dir();
    const t = Number.MAX_SAFE_INTEGER - 2;
    writeFileSync(join(d, 's.csv'), `site,time,state\nA,${t - 1},a\nA,${t},b\nB,${t - 1},b\nB,${t},a\n`);
    writeFileSync(join(d, 's.yaml'), 'data: s.csv\nuncertainty: { draws: 20, seed: 1 }\nhorizon: { steps: 5 }\n');
    badInput(await sere(['forecast', join(d, 's.yaml')]), '(horizon)');
    writeFileSync(join(d, 's.yaml'), 'data: s.csv\nuncertainty: { draws: 20, seed: 1 }\nhorizon: { steps: 2 }\n');
    const r = await sere(['forecast', join(d, 's.yaml'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).scenarios[0].years.at(-1)).toBe(Number.MAX_SAFE_INTEGER);
  });

  it('Latin-1 bytes: exit 1 at file:line:column', async () => {
    const file = join(dir(), 's.csv');
    writeFileSync(file, Buffer.concat([Buffer.from('site,time,state\nA,1,a\nA,2,caf'), Buffer.from([0xe9, 0x0a])]));
    badInput(await sere(['fit', file]), `${file}:3:8: holds bytes that are not UTF-8`);
  });

  it('a quoted label holding a newline and ESC is refused, and the message stays one escaped line', async () => {
    const file = join(dir(), 's.csv');
    writeFileSync(file, 'site,time,state\nA,1,a\nA,2,"b\n\u001b[2Jx"\n');
    badInput(await sere(['fit', file]), "'b\\n\\u001b[2Jx'");
  });

  it('a 10 MB label puts a short line on stderr', async () => {
    const file = join(dir(), 's.csv');
    writeFileSync(file, `site,time,state\nA,1,a\nA,2,${'w'.repeat(10_000_000)}\n`);
    const r = await sere(['fit', file]);
    badInput(r, `${file}:3:3: state '${'w'.repeat(57)}…' is 10000000 characters long`);
    expect(r.stderr.length).toBeLessThan(400);
  });

  it('10,000 states are refused at once instead of hanging the fit', async () => {
    const file = join(dir(), 's.csv');
    const rows = Array.from({ length: 10_000 }, (_, n) => `S${n},1,state${n}\nS${n},2,state${(n + 1) % 10_000}`);
    writeFileSync(file, `site,time,state\n${rows.join('\n')}\n`);
    const started = Date.now();
    badInput(await sere(['fit', file]), 'more than 100 different states');
    expect(Date.now() - started).toBeLessThan(5_000);
  });

  it('a repeated column name: exit 1 on line 1', async () => {
    const file = join(dir(), 's.csv');
    writeFileSync(file, 'site,time,state,time\nA,1,a,1\nA,2,b,2\n');
    badInput(await sere(['fit', file]), `${file}:1:4: column 'time' appears twice`);
  });
});

describe('input paths that are not regular files', () => {
  it('a FIFO as survey table, fit file or scenario is refused without blocking', async () => {
    const d = dir();
    for (const name of ['s.csv', 'f.json', 's.yaml']) {
      if (spawnSync('mkfifo', [join(d, name)]).status !== 0) throw new Error('mkfifo is needed for this test');
    }
    badInput(await sere(['fit', join(d, 's.csv')]), 'is a pipe, not a survey table');
    badInput(await sere(['forecast', join(d, 's.yaml')]), 'is a pipe, not a scenario file');
    badInput(await sere(['check', join(d, 'f.json')]), 'is a pipe, not a fit file');
  });

  it('/dev/zero and a folder are refused', async () => {
    badInput(await sere(['fit', '/dev/zero']), '/dev/zero: is a device');
    badInput(await sere(['fit', dir()]), 'is a folder');
  });
});

describe('row order', () => {
  it('a shuffled survey table gives the same bootstrap forecast for the same seed', async () => {
    const d = dir();
    const [header, ...body] = readFileSync('scenarios/brenhollow/surveys.csv', 'utf8').trimEnd().split('\n');
    writeFileSync(join(d, 'shuffled.csv'), [header, ...body.reverse()].join('\n') + '\n');
    copyFileSync('scenarios/brenhollow/surveys.csv', join(d, 'sorted.csv'));
    const scenario = (data: string): string => {
      const file = join(d, `${data}.yaml`);
      writeFileSync(file, `data: ${data}.csv\nuncertainty: { source: bootstrap, draws: 300, seed: 99 }\nhorizon: { years: 20 }\n`);
      return file;
    };
    const a = await sere(['forecast', scenario('sorted'), '--json']);
    const b = await sere(['forecast', scenario('shuffled'), '--json']);
    expect(a.code).toBe(0);
    const shares = (out: string): string => JSON.stringify(JSON.parse(out).scenarios[0].shares);
    expect(shares(b.stdout)).toBe(shares(a.stdout));
  });
});

describe('labels named like Object.prototype members', () => {
  it('work as states in fit, scenario shares, treatments, events and the target', async () => {
    const d = dir();
    const names = ['__proto__', 'constructor', 'hasOwnProperty', 'toString', 'valueOf'];
    // Site s cycles through the states with stride s % 4 + 1 from state s, so every state leaves and is reached.
    const rows = Array.from({ length: 20 }, (_, s) => Array.from({ length: 5 }, (_, t) =>
      `S${s},${2000 + t},${names[(s + t * ((s % 4) + 1)) % 5]}`)).flat();
    writeFileSync(join(d, 'p.csv'), `site,time,state\n${rows.join('\n')}\n`);
    writeFileSync(join(d, 's.yaml'), [
      'data: p.csv',
      'uncertainty: { draws: 50, seed: 3 }',
      'start: { year: 2004, shares: { __proto__: 0.5, constructor: 0.25, toString: 0.25 } }',
      'horizon: { years: 5 }',
      'target: { state: __proto__, share: 0.3 }',
      'treatments: [{ name: t, state: valueOf, multiply: { __proto__: 1.1 } }]',
      'events: [{ name: e, every: 5, matrix: { __proto__: { constructor: 0.5, __proto__: 0.5 } } }]',
    ].join('\n') + '\n');
    const fit = await sere(['fit', join(d, 'p.csv'), '--json']);
    expect(fit.code, fit.stderr).toBe(0);
    expect(JSON.parse(fit.stdout).states).toEqual(names);
    const r = await sere(['forecast', join(d, 's.yaml'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout).scenarios[0];
    // Compared as entries: a `__proto__` key in an object literal here would set a prototype instead.
    expect(Object.entries(s.start.shares)).toEqual([['__proto__', 0.5], ['constructor', 0.25], ['hasOwnProperty', 0], ['toString', 0.25], ['valueOf', 0]]);
    expect(Object.keys(s.shares)).toEqual(names);
    expect(Object.getOwnPropertyDescriptor(s.shares, '__proto__')?.value.median[0]).toBe(0.5);
  });
});
