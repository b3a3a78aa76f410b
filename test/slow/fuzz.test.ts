import { mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync, mkdirSync, cpSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sereInProcess, type Outcome } from '../cli/in-process.js';

/**
 * Fuzzing the whole CLI, in process and seeded (fast-check, fixed seeds: a failure names its seed
 * and shrinks to a small counter-example). Families: survey CSV bytes and structure, encodings,
 * scenario YAML values and nasty YAML, edited fit files, flags, and workspaces with damaged
 * records. Whatever the input, sere must:
 *   - exit 0, 1 or 2 — never 70 (an internal error) or a crash;
 *   - on exit 1, print one line naming a place (a file, a key path or a flag);
 *   - on any error, leave the folder exactly as it was (nothing written, nothing half-written);
 *   - on success with --json, print shares in [0, 1] whose means sum to 1.
 */

/** Every run with --debug, so an exit-1 line carries its error code. */
const sere = (args: string[]): Promise<Outcome> => sereInProcess([...args, '--debug']);

/** Every file under `dir` with its size and modification time: what "nothing written" compares. */
function snapshot(dir: string): string {
  const out: string[] = [];
  const walk = (d: string): void => {
    for (const name of readdirSync(d).sort()) {
      const full = join(d, name);
      const st = statSync(full);
      if (st.isDirectory()) walk(full);
      else out.push(`${full} ${st.size} ${st.mtimeMs}`);
    }
  };
  walk(dir);
  return out.join('\n');
}

/** The contract every run must keep; `dir` is the folder the run may write to. */
async function expectContract(args: string[], dir: string): Promise<Outcome> {
  const before = snapshot(dir);
  const r = await sere(args);
  const what = `sere ${args.join(' ')}\n${r.stderr}`;
  expect([0, 1, 2], what).toContain(r.code);
  if (r.code !== 0) expect(snapshot(dir), `wrote on error: ${what}`).toBe(before);
  if (r.code === 1) {
    expect(r.stderr.endsWith('\n') && r.stderr.indexOf('\n') === r.stderr.length - 1, `not one line: ${what}`).toBe(true);
    const m = /^sere: error \[[A-Z_0-9]+\]: (.*)$/.exec(r.stderr.trimEnd());
    expect(m, what).not.toBeNull();
    const where = m![1]!;
    // A place: a path in the run's folder (as given or relative), a flag, or a key path.
    const placed = where.includes(basename(dir)) || /^--[a-z]/.test(where) || /^[A-Za-z_][\w.[\]-]*: /.test(where);
    expect(placed, `no place: ${what}`).toBe(true);
  }
  if (r.code === 0 && args.includes('--json') && args[0] === 'forecast') expectSaneForecast(JSON.parse(r.stdout), what);
  return r;
}

function expectSaneForecast(json: { scenarios: { years: number[]; shares: Record<string, { mean: number[]; low: number[]; high: number[]; median: number[] }> }[] }, what: string): void {
  for (const s of json.scenarios) {
    const bands = Object.values(s.shares);
    s.years.forEach((_, t) => {
      let sum = 0;
      for (const b of bands) {
        for (const v of [b.low[t]!, b.median[t]!, b.high[t]!, b.mean[t]!]) expect(v >= 0 && v <= 1, what).toBe(true);
        sum += b.mean[t]!;
      }
      expect(Math.abs(sum - 1), what).toBeLessThan(1e-9);
    });
  }
}

const STATES = ['bare', 'grass', 'shrub', 'constructor', 'wood'];
const ODD_LABELS = ['__proto__', 'toString', 'Grass', 'gr\u200bass', 'gra\u0301ss', 'grаss' /* Cyrillic а */, ' grass ', 'x'.repeat(300), 'a\nb', '', 'bare;grass', '"q"'];

/** A clean survey table: 12 sites × 5 years, every state leaving and reached. */
function cleanTable(): string[] {
  const rows = ['site,time,state'];
  for (let s = 0; s < 12; s++) for (let t = 0; t < 5; t++) rows.push(`P${s},${2010 + t},${STATES[(s + t * (1 + (s % 3))) % STATES.length]}`);
  return rows;
}

/** One edit to a CSV, as text lines or raw bytes. */
const csvEdit = fc.oneof(
  fc.record({ kind: fc.constant('label' as const), row: fc.nat(60), label: fc.constantFrom(...ODD_LABELS) }),
  fc.record({ kind: fc.constant('time' as const), row: fc.nat(60), time: fc.constantFrom('1e400', '99999999999999999999', '-0', '2011.5', '', 'NaN', '9007199254740993', '0x10', ' 2012') }),
  fc.record({ kind: fc.constant('drop' as const), row: fc.nat(60) }),
  fc.record({ kind: fc.constant('header' as const), header: fc.constantFrom('site,time,state,state', 'site,time', 'site;time;state', 'site,time,state,extra', '\ufeffsite,time,state', 'site,Time,state', '') }),
  fc.record({ kind: fc.constant('bytes' as const), at: fc.nat(400), bytes: fc.constantFrom([0xff], [0x00], [0xc3], [0xe2, 0x80, 0x8b], [0x0d], [0x22], [0x2c, 0x2c]) }),
);
type CsvEdit = typeof csvEdit extends fc.Arbitrary<infer T> ? T : never;

function applyCsv(edits: readonly CsvEdit[]): Buffer {
  const rows = cleanTable();
  let bytes: { at: number; bytes: readonly number[] }[] = [];
  for (const e of edits) {
    const r = 1 + (('row' in e ? e.row : 0) % (rows.length - 1));
    if (e.kind === 'label') rows[r] = rows[r]!.replace(/[^,]*$/, e.label);
    else if (e.kind === 'time') rows[r] = rows[r]!.replace(/,[^,]*,/, `,${e.time},`);
    else if (e.kind === 'drop') rows.splice(r, 1);
    else if (e.kind === 'header') rows[0] = e.header;
    else bytes = [...bytes, { at: e.at, bytes: e.bytes }];
  }
  let buf = Buffer.from(rows.join('\n') + '\n', 'utf8');
  for (const b of bytes) {
    const at = b.at % (buf.length + 1);
    buf = Buffer.concat([buf.subarray(0, at), Buffer.from(b.bytes), buf.subarray(at)]);
  }
  return buf;
}

const scratch = (): string => mkdtempSync(join(tmpdir(), 'sere-fuzz-'));
// SERE_FUZZ_SEED explores other cases locally; CI keeps the fixed seed so a red run is reproducible.
const SEED = Number(process.env['SERE_FUZZ_SEED'] ?? 20261202);

describe('fuzzing the CLI (seeded; exit codes, one placed line, nothing written on error)', () => {
  it('survey CSV bytes, structure and encodings: fit, and fit --out', async () => {
    await fc.assert(fc.asyncProperty(fc.array(csvEdit, { minLength: 1, maxLength: 4 }), async (edits) => {
      const dir = scratch();
      const csv = join(dir, 'p.csv');
      writeFileSync(csv, applyCsv(edits));
      await expectContract(['fit', csv, '--json'], dir);
      const out = await expectContract(['fit', csv, '--out', join(dir, 'fit.json')], dir);
      if (out.code === 0) expect(JSON.parse(readFileSync(join(dir, 'fit.json'), 'utf8')).format).toBe('sere-fit');
    }), { seed: SEED, numRuns: 120 });
  });

  it('scenario YAML: odd values, nasty YAML, unknown keys', async () => {
    const value = fc.constantFrom('-1', '0', '1.5', '1e309', '4294967296', '1000000000', 'null', '~', '[]', '{}', '"x"', 'yes',
      '*nope', '&a [*a]', '!!binary aGk=', '[mudflat>x]', '{ state: __proto__, share: 0.5 }', '.nan', "'\u0000'", '0x7fffffff');
    const key = fc.constantFrom('horizon.years', 'horizon.steps', 'uncertainty.draws', 'uncertainty.seed', 'uncertainty.source', 'plots',
      'show', 'level', 'target', 'target.share', 'start', 'fit.step', 'fit.prior', 'fit.states', 'fit.impossible', 'treatments', 'events', 'extra', 'data');
    await fc.assert(fc.asyncProperty(fc.array(fc.tuple(key, value), { minLength: 1, maxLength: 3 }), async (edits) => {
      const dir = scratch();
      writeFileSync(join(dir, 'p.csv'), cleanTable().join('\n') + '\n');
      const doc: Record<string, Record<string, string> | string> = {
        data: 'p.csv', uncertainty: { draws: '40', seed: '7' }, horizon: { years: '8' }, target: '{ state: wood, share: 0.3 }',
      };
      for (const [path, v] of edits) {
        const [top, sub] = path.split('.') as [string, string | undefined];
        if (sub === undefined) doc[top] = v;
        else {
          const block = typeof doc[top] === 'object' ? doc[top] as Record<string, string> : {};
          block[sub] = v;
          doc[top] = block;
        }
      }
      const yaml = Object.entries(doc).map(([k, v]) => typeof v === 'string' ? `${k}: ${v}`
        : `${k}:\n${Object.entries(v).map(([s, x]) => `  ${s}: ${x}`).join('\n')}`).join('\n') + '\n';
      writeFileSync(join(dir, 's.yaml'), yaml);
      await expectContract(['forecast', join(dir, 's.yaml'), '--json', '--draws', '40'], dir);
    }), { seed: SEED, numRuns: 150 });
  });

  it('edited fit files', async () => {
    const dir0 = scratch();
    writeFileSync(join(dir0, 'p.csv'), cleanTable().join('\n') + '\n');
    expect((await sere(['fit', join(dir0, 'p.csv'), '--out', join(dir0, 'fit.json')])).code).toBe(0);
    const original = JSON.parse(readFileSync(join(dir0, 'fit.json'), 'utf8')) as Record<string, unknown>;
    const paths: string[][] = [];
    const collect = (v: unknown, path: string[]): void => {
      paths.push(path);
      if (v && typeof v === 'object' && path.length < 4) for (const [k, x] of Object.entries(v)) collect(x, [...path, k]);
    };
    collect(original, []);
    const replacement = fc.constantFrom<unknown>(null, {}, [], -1, 0, 1.5, 1e308, 'x', '__proto__', [0, 0], ['bare', 'bare'], true, 2 ** 53 + 2);
    await fc.assert(fc.asyncProperty(fc.constantFrom(...paths.filter((p) => p.length > 0)), replacement, async (path, v) => {
      const dir = scratch();
      const fit = structuredClone(original);
      let node = fit as Record<string, unknown>;
      for (const k of path.slice(0, -1)) node = node[k] as Record<string, unknown>;
      node[path[path.length - 1]!] = v;
      writeFileSync(join(dir, 'fit.json'), JSON.stringify(fit));
      writeFileSync(join(dir, 's.yaml'), 'data: fit.json\nuncertainty: { draws: 40, seed: 3 }\nhorizon: { years: 6 }\nplots: latest\n');
      await expectContract(['forecast', join(dir, 's.yaml'), '--json'], dir);
    }), { seed: SEED, numRuns: 120 });
  });

  it('flags with odd values, on every command', async () => {
    const dir0 = scratch();
    writeFileSync(join(dir0, 'p.csv'), cleanTable().join('\n') + '\n');
    writeFileSync(join(dir0, 's.yaml'), 'data: p.csv\nuncertainty: { draws: 40, seed: 3 }\nhorizon: { years: 6 }\n');
    const command = fc.constantFrom(
      ['fit', join(dir0, 'p.csv')], ['check', join(dir0, 'p.csv'), '--draws', '50', '--replicates', '19'],
      ['forecast', join(dir0, 's.yaml')], ['compare', join(dir0, 's.yaml'), join(dir0, 's.yaml')],
      ['hindcast', join(dir0, 'p.csv'), '--draws', '30', '--years', '1'], ['effort', join(dir0, 's.yaml'), '--replicates', '1', '--draws', '30', '--sites', '5', '--seasons', '1'],
    );
    const flag = fc.constantFrom('--seed', '--draws', '--step', '--level', '--prior', '--states', '--impossible', '--years', '--sites',
      '--seasons', '--replicates', '--horizon', '--periods', '--target', '--state-column', '--by', '--date');
    const value = fc.constantFrom('0', '-1', '1e9', '4294967296', '0.5', '1', 'abc', '', ',', 'bare>nope', 'bare,bare', '2015-2011', '__proto__', '1,0', ' 3 ');
    await fc.assert(fc.asyncProperty(command, fc.array(fc.tuple(flag, value), { maxLength: 2 }), async (cmd, flags) => {
      await expectContract([...cmd, ...flags.flat(), '--json'], dir0);
    }), { seed: SEED, numRuns: 120 });
  });

  it('workspaces with damaged records and odd workspace files', async () => {
    // One real workspace with one record, copied for each case (a season is the slowest command).
    const base = join(scratch(), 'ws');
    expect((await sere(['init', base])).code).toBe(0);
    const wsFile = join(base, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace(/  - scenarios\/storm-surges.yaml\n  - scenarios\/options.yaml\n/, ''));
    writeFileSync(join(base, 'scenarios', 'no-action.yaml'), readFileSync(join(base, 'scenarios', 'no-action.yaml'), 'utf8').replace('draws: 4000', 'draws: 40'));
    expect((await sere(['season', base, '--date', '2025-01-01'])).code).toBe(0);
    const recordFiles = ['manifest.json', 'fit.json', 'forecasts/scenarios-no-action.json'];
    const damage = fc.oneof(
      fc.record({ file: fc.constantFrom(...recordFiles), text: fc.constantFrom('{}', 'null', '[]', '', '{"scenarios":[{}]}', '{"seed":0}', '\u0000') }),
      fc.record({ file: fc.constant('sere-workspace.yaml'), text: fc.constantFrom('name: x\nsurveys: []\nscenarios: [a.yaml]\n', 'records: ../out\n',
        'name: x\nsurveys: [surveys/brenhollow-2015-2024.csv]\nscenarios: [scenarios/no-action.yaml, scenarios/no-action.yml]\n', '*a', '') }),
    );
    await fc.assert(fc.asyncProperty(damage, async ({ file, text }) => {
      const dir = join(scratch(), 'ws');
      cpSync(base, dir, { recursive: true });
      const target = file === 'sere-workspace.yaml' ? join(dir, file) : join(dir, 'records', '2025-01-01', file);
      mkdirSync(join(target, '..'), { recursive: true });
      writeFileSync(target, text);
      const r = await expectContract(['season', dir, '--date', '2025-06-01'], dir);
      if (file !== 'sere-workspace.yaml') expect(r.code, r.stderr).toBe(0);
    }), { seed: SEED, numRuns: 12 });
  });
});
