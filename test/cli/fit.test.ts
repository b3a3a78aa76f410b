import { mkdtempSync, readFileSync, writeFileSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const fx = (name: string): string => `test/fixtures/${name}`;

describe('sere fit (built binary)', () => {
  it('prints counts, estimates and the stationary mix of a survey table', () => {
    const r = sere(['fit', fx('hand.csv')]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Transition counts, from → to');
    expect(r.stdout).toContain('2 sites · 10 surveys (1–7) · 8 transitions');
    expect(r.stderr).toBe('');
  });

  it('--json prints the documented keys, matrices as rows in state order', () => {
    const r = sere(['fit', fx('hand.csv'), '--json', '--prior', 'uniform', '--level', '0.95']);
    const json = JSON.parse(r.stdout);
    expect(json.states).toEqual(['a', 'b', 'c']);
    expect(json.counts).toEqual([[1, 2, 0], [1, 1, 1], [0, 1, 1]]);
    expect(json.probabilities[0]).toEqual([1 / 3, 2 / 3, 0]);
    // Uniform prior: row a is Dirichlet(2, 3, 1), mean (1/3, 1/2, 1/6).
    expect(json.posterior.mean[0]).toEqual([2 / 6, 3 / 6, 1 / 6]);
    expect(json.posterior.level).toBe(0.95);
    expect(json.stationary).toHaveLength(3);
    expect(json.site_counts).toHaveLength(2);
    expect(json.input.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('writes --out atomically, refuses to overwrite without --force, and a forecast can use it', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-'));
    const out = join(dir, 'fit.json');
    expect(sere(['fit', fx('hand.csv'), '--out', out]).code).toBe(0);
    const first = readFileSync(out, 'utf8');
    writeFileSync(out, first.replace('"step": 1', '"step": 1 '));
    const again = sere(['fit', fx('hand.csv'), '--out', out]);
    expect(again.code).toBe(1);
    expect(again.stderr).toContain(`${out}: already exists`);
    expect(readFileSync(out, 'utf8')).not.toBe(first);
    expect(sere(['fit', fx('hand.csv'), '--out', out, '--force']).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toBe(first);
    expect(readdirSync(dir)).toEqual(['fit.json']);
    const scenario = join(dir, 's.yaml');
    writeFileSync(scenario, 'data: fit.json\nuncertainty: { draws: 100, seed: 3 }\nhorizon: { steps: 4 }\n');
    const f = sere(['forecast', scenario, '--json']);
    expect(f.code).toBe(0);
    expect(JSON.parse(f.stdout).scenarios[0].years).toEqual([7, 8, 9, 10, 11]);
  });

  const bad: [string, string[], string][] = [
    ['missing column', [fx('missing-column.csv')], `${fx('missing-column.csv')}:1: no 'time' column`],
    ['empty state', [fx('empty-state.csv')], `${fx('empty-state.csv')}:4:3: empty state`],
    ['non-integer time', [fx('bad-time.csv')], `${fx('bad-time.csv')}:3:2: time '2.5'`],
    ['conflicting duplicate', [fx('duplicate.csv')], `${fx('duplicate.csv')}:4: site 'A' at time 2 is 'c' here but 'b' on line 3`],
    ['unknown state under --states', [fx('hand.csv'), '--states', 'a,c'], `${fx('hand.csv')}:4:3: unknown state 'b'`],
    ['empty file', [fx('empty.csv')], `${fx('empty.csv')}: the survey table is empty`],
    ['not CSV (ragged rows)', [fx('ragged.csv')], `${fx('ragged.csv')}:3: not a readable CSV table`],
    ['not CSV (binary)', [fx('not-text.csv')], `${fx('not-text.csv')}: is not a text file`],
    ['case clash', [fx('case-clash.csv')], `${fx('case-clash.csv')}:3:3: state 'A' differs from 'a'`],
    ['no pair one step apart', [fx('five-year.csv')], 'try --step 5'],
    ['missing file', [fx('nope.csv')], `${fx('nope.csv')}: cannot read the survey table`],
  ];
  for (const [what, args, message] of bad) {
    it(`${what}: exit 1, one line naming the place and the fix, no stack trace`, () => {
      const r = sere(['fit', ...args]);
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toContain(' — ');
      expect(r.stderr).not.toMatch(/\n\s+at /);
    });
  }

  it('usage errors exit 2', () => {
    expect(sere(['fit']).code).toBe(2);
    expect(sere(['fit', fx('hand.csv'), '--step', 'x']).code).toBe(2);
    expect(sere(['fit', fx('hand.csv'), '--bogus']).code).toBe(2);
    expect(sere([]).code).toBe(2);
    expect(sere(['--help']).code).toBe(0);
  });

  it('writes nothing when the input is bad', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-'));
    const out = join(dir, 'fit.json');
    expect(sere(['fit', fx('bad-time.csv'), '--out', out]).code).toBe(1);
    expect(existsSync(out)).toBe(false);
  });
});

describe('sere fit --by (built binary)', () => {
  it('writes one fit per group with the same states, and refuses to overwrite any of them', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-'));
    const out = join(dir, 'soils.json');
    const r = sere(['fit', fx('grouped.csv'), '--by', 'soil', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Do the groups differ?');
    expect(readdirSync(dir).sort()).toEqual(['soils-clay.json', 'soils-sand.json']);
    const clay = JSON.parse(readFileSync(join(dir, 'soils-clay.json'), 'utf8'));
    const sand = JSON.parse(readFileSync(join(dir, 'soils-sand.json'), 'utf8'));
    expect(clay.states).toEqual(['a', 'b']);
    expect(sand.states).toEqual(['a', 'b']);
    expect(clay.counts).toEqual([[0, 1], [1, 1]]);
    expect(sand.counts).toEqual([[2, 0], [0, 1]]);
    const again = sere(['fit', fx('grouped.csv'), '--by', 'soil', '--out', out]);
    expect(again.code).toBe(1);
    expect(again.stderr).toContain('no group was written');
    expect(sere(['fit', fx('grouped.csv'), '--by', 'soil']).code).toBe(1);
  });

  it('a scenario can fit one group of a survey table', () => {
    const r = sere(['forecast', 'test/fixtures/scenarios/group-fit.yaml', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).scenarios[0].data.transitions).toBe(3);
    const bad = sere(['forecast', 'test/fixtures/scenarios/group-missing.yaml']);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain("no rows with soil = 'peat'");
    expect(bad.stderr).toContain('use one of: clay, sand');
  });
});
