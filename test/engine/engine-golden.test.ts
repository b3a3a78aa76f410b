import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';

/**
 * Whole outputs of the demo, byte for byte, against recorded files (test/fixtures/engine-golden/).
 * First recorded on the engine that kept every year of every draw, they proved the chunked engine
 * byte-identical to it; re-recorded once when draws moved to per-block random sub-streams (for
 * threads, value-breaking: CHANGELOG). Every path of the engine is here: the posterior and
 * the site bootstrap, a partial-area treatment (sub-populations), landscape events with plot
 * counts and the uncertainty split, a cap that must stay met with a treated long-run mix, a
 * comparison on common random numbers, and two season records (the second reruns the scenarios
 * from the previous start for what changed). Draw counts are not multiples of the engine's blocks.
 *
 * A change of engine layout must leave these identical. A deliberate change of seeded numbers
 * (value-breaking, CHANGELOG) re-records them: `SERE_RECORD_GOLDENS=1 npx vitest run test/engine/engine-golden.test.ts`.
 */
const GOLDEN = 'test/fixtures/engine-golden';
const RECORD = process.env.SERE_RECORD_GOLDENS === '1';
const demo = (name: string): string => `scenarios/brenhollow/${name}.yaml`;

const runs: { name: string; args: string[] }[] = [
  { name: 'forecast-no-action.json', args: ['forecast', demo('no-action'), '--draws', '1100', '--json'] },
  { name: 'forecast-new-cell.json', args: ['forecast', demo('new-cell'), '--draws', '700', '--json'] },
  { name: 'forecast-sow-pioneer.json', args: ['forecast', demo('sow-pioneer'), '--draws', '900', '--json'] },
  { name: 'forecast-storm-surges.json', args: ['forecast', demo('storm-surges'), '--draws', '1300', '--json'] },
  { name: 'forecast-cap-rank-grass.json', args: ['forecast', demo('cap-rank-grass'), '--draws', '1000', '--json'] },
  { name: 'forecast-options.json', args: ['forecast', demo('options'), '--draws', '600', '--json'] },
  { name: 'compare-options.json', args: ['compare', demo('options'), '--draws', '1200', '--json'] },
];

function check(name: string, text: string): void {
  const file = join(GOLDEN, name);
  if (RECORD) { writeFileSync(file, text); return; }
  // toBe on whole files would print megabytes on failure: compare, then say which file and where.
  const want = readFileSync(file, 'utf8');
  if (text !== want) {
    let at = 0;
    while (at < text.length && text[at] === want[at]) at++;
    expect.fail(`${name} differs from its golden at character ${at}: got …${text.slice(Math.max(0, at - 80), at + 80)}… want …${want.slice(Math.max(0, at - 80), at + 80)}…`);
  }
}

/**
 * `--variation none` is the fixed-matrix chain of before year-to-year variation: these goldens were
 * recorded by that engine (test/fixtures/engine-golden/no-variation/; re-recorded only with a
 * value-breaking change to the fixed-matrix path — last when gamma variates moved to ziggurat normals; with
 * SERE_RECORD_GOLDENS=1 like the others) and must
 * come out byte for byte — the posterior, a partial-area treatment, events with plot counts and
 * the uncertainty split, and a comparison.
 */
describe('without year-to-year variation, the outputs of before it, byte for byte', () => {
  const before: { name: string; args: string[] }[] = [
    { name: 'forecast-no-action.json', args: ['forecast', demo('no-action'), '--draws', '1100', '--json'] },
    { name: 'forecast-sow-pioneer.json', args: ['forecast', demo('sow-pioneer'), '--draws', '900', '--json'] },
    { name: 'forecast-storm-surges.json', args: ['forecast', demo('storm-surges'), '--draws', '1300', '--json'] },
    { name: 'compare-options.json', args: ['compare', demo('options'), '--draws', '1200', '--json'] },
  ];
  for (const run of before) {
    it(run.name, () => {
      const r = sere([...run.args, '--variation', 'none']);
      expect(r.code, r.stderr).toBe(0);
      check(join('no-variation', run.name), r.stdout);
    });
  }
});

describe('engine outputs are byte-identical to the recorded goldens', () => {
  for (const run of runs) {
    it(run.name, () => {
      const r = sere(run.args);
      expect(r.code, r.stderr).toBe(0);
      check(run.name, r.stdout);
    });
  }

  it('two season records of the demo workspace (forecasts, comparisons, changes, scores, tables)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-golden-'));
    try {
      const ws = join(dir, 'ws');
      expect(sere(['init', ws]).code).toBe(0);
      for (const date of ['2026-01-01', '2026-01-02']) {
        const r = sere(['season', ws, '--date', date]);
        expect(r.code, r.stderr).toBe(0);
      }
      const records = join(ws, 'records');
      const files: string[] = [];
      const walk = (at: string): void => {
        for (const entry of readdirSync(at).sort()) {
          const path = join(at, entry);
          if (statSync(path).isDirectory()) walk(path);
          else files.push(path);
        }
      };
      walk(records);
      // The engine's outputs: the first record's forecasts, comparisons, scores and tables, and the
      // second's changes (the fit and the manifest are not the engine's, and the rest repeats).
      const kept = files.map((file) => relative(records, file)).filter((file) =>
        /^2026-01-01\/(forecasts|comparisons|tables)\/|^2026-01-01\/scores\.json$|^2026-01-02\/changes\.json$/.test(file));
      expect(kept.length).toBe(9);
      for (const file of kept) check(`season-${file.replaceAll('/', '--')}`, readFileSync(join(records, file), 'utf8'));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});
