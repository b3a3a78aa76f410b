import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeWorkbooks } from '../../scripts/make-workbooks.js';
import { sereInProcess as sere, type Outcome } from './in-process.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-layouts-'));
function write(name: string, text: string): string {
  const file = join(dir, name);
  writeFileSync(file, text);
  return file;
}
function badInput(r: Outcome, code = 1): void {
  expect(r.code, r.stderr).toBe(code);
  expect(r.stdout).toBe('');
  expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
  expect(r.stderr).not.toMatch(/\n\s+at /);
}

// Invented: 30 plots surveyed 2016–2023, each a run of states moving one way with a few gaps.
const states = ['bare', 'grass', 'scrub', 'wood'];
const wideRows = Array.from({ length: 30 }, (_, p) => {
  const cells = Array.from({ length: 8 }, (_, y) => ((p * 7 + y * 3) % 11 === 0 ? '' : states[Math.min(3, Math.floor((p % 4) + y / 3)) % 4]!));
  return `plot${p},${cells.join(',')}`;
});
const wide = write('wide.csv', `site,2016,2017,2018,2019,2020,2021,2022,2023\n${wideRows.join('\n')}\n`);

describe('layouts on the command line', () => {
  it('fit, check and hindcast accept a wide table', async () => {
    const out = join(dir, 'fit.json');
    const fit = await sere(['fit', wide, '--out', out]);
    expect(fit.code, fit.stderr).toBe(0);
    expect(existsSync(out)).toBe(true);
    expect((await sere(['check', wide, '--seed', '7', '--json'])).code).toBe(0);
    const hindcast = await sere(['hindcast', wide, '--years', '1', '--draws', '50', '--seed', '3', '--json']);
    expect(hindcast.code, hindcast.stderr).toBe(0);
  });

  it('a wide table with a site on two rows: exit 1, one line naming both lines, nothing written', async () => {
    const dup = write('dup.csv', `site,2016,2017\nA,bare,grass\nB,grass,grass\nA,bare,bare\n`);
    const out = join(dir, 'dup.json');
    const r = await sere(['fit', dup, '--out', out]);
    badInput(r);
    expect(r.stderr).toContain('dup.csv:4:1');
    expect(r.stderr).toContain('line 2');
    expect(existsSync(out)).toBe(false);
  });

  it('a label map with a duplicate key: exit 1, one line with the file and line, nothing written', async () => {
    const map = write('dup-labels.yaml', 'bare: bare\ngrass: grass\nscrub: scrub\nwood: wood\n"grass": scrub\n');
    const out = join(dir, 'dup-labels.json');
    const r = await sere(['fit', wide, '--labels', map, '--out', out]);
    badInput(r);
    expect(r.stderr).toContain('dup-labels.yaml:5:1');
    expect(existsSync(out)).toBe(false);
  });

  it('init --from a wide sheet with a label map, a season, and its replay from the record alone', async () => {
    const books = await writeWorkbooks(dir);
    const codes = write('codes.yaml', '41: woodland\n');
    const ws = join(dir, 'ws');
    const init = await sere(['init', ws, '--from', books.surveys, '--sheet', 'By year', '--site-column', 'plot', '--group-column', 'zone',
      '--labels', codes, '--states', 'grass,heath,scrub,woodland']);
    expect(init.code, init.stderr).toBe(0);
    expect(existsSync(join(ws, 'surveys', 'codes.yaml'))).toBe(true);
    const season = await sere(['season', ws, '--date', '2026-12-01']);
    expect(season.code, season.stderr).toBe(0);
    expect(existsSync(join(ws, 'records', '2026-12-01', 'inputs', 'surveys', 'codes.yaml'))).toBe(true);
    const replay = await sere(['season', ws, '--replay', '2026-12-01']);
    expect(replay.code, replay.stderr).toBe(0);
  });
});
