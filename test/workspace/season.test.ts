import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';
import { writeFolderAtomic } from '../../src/workspace/record-folder.js';
import { SereError } from '../../src/errors.js';

/** A demo workspace made light for tests: 300 draws, the surveys split into 2015–2023 and 2024. */
function workspace(): string {
  const dir = join(mkdtempSync(join(tmpdir(), 'sere-ws-')), 'brenhollow');
  expect(sere(['init', dir]).code).toBe(0);
  for (const name of ['no-action.yaml', 'storm-surges.yaml', 'options.yaml']) {
    const file = join(dir, 'scenarios', name);
    writeFileSync(file, readFileSync(file, 'utf8').replace('draws: 4000', 'draws: 300'));
  }
  const all = readFileSync(join(dir, 'surveys', 'brenhollow-2015-2024.csv'), 'utf8').trim().split('\n');
  const [header, ...rows] = all;
  writeFileSync(join(dir, 'surveys', 'brenhollow-2015-2024.csv'), [header, ...rows.filter((r) => !r.includes(',2024,'))].join('\n') + '\n');
  writeFileSync(join(dir, 'new-2024.csv'), [header, ...rows.filter((r) => r.includes(',2024,'))].join('\n') + '\n');
  return dir;
}

const records = (dir: string): string[] => readdirSync(join(dir, 'records')).sort();

describe('sere season (built binary)', () => {
  it('writes a complete record that replays identically from its own files, then reports changes season by season', () => {
    const dir = workspace();
    const first = sere(['season', dir, '--date', '2025-09-30']);
    expect(first.code).toBe(0);
    expect(first.stdout).toContain('First record in this workspace');
    expect(records(dir)).toEqual(['2025-09-30']);
    const record = join(dir, 'records', '2025-09-30');
    const manifest = JSON.parse(readFileSync(join(record, 'manifest.json'), 'utf8'));
    for (const path of manifest.contents) expect(existsSync(join(record, path)), path).toBe(true);
    expect(manifest.contents).toContain('comparisons/scenarios-options.json');
    expect(manifest.contents).toContain('tables/scenarios-no-action.csv');
    expect(manifest.contents).toContain('charts/differences/scenarios-options.svg');
    expect(manifest.scenarios.map((s: { seed: number }) => s.seed)).toEqual([20261201, 20261201, 20261201]);
    expect(readFileSync(join(record, 'tables', 'scenarios-no-action.csv'), 'utf8').split('\n')[0]).toBe('scenario,alternative,state,year,measure,statistic,value,unit');
    // A compared file's table comes from the same writer as `compare --csv`: differences included.
    const options = readFileSync(join(record, 'tables', 'scenarios-options.csv'), 'utf8').split('\n').map((l) => l.split(','));
    // Three alternatives × five years (the start and the four shown) × four statistics.
    expect(options.filter((r) => r[4] === 'difference' && r[2] === 'high-marsh').length).toBe(3 * 5 * 4);
    const replay = sere(['season', '--replay', record]);
    expect(replay.stdout).toContain('files identical');
    expect(replay.code).toBe(0);

    // The same data again: nothing moves; a second record the same day gets its own name.
    const again = sere(['season', dir, '--date', '2025-09-30']);
    expect(again.stdout).toContain('data unchanged');
    expect(again.stdout).toContain('no median or band moved in the years both records forecast');
    expect(records(dir)).toEqual(['2025-09-30', '2025-09-30-2']);
    expect(JSON.parse(readFileSync(join(dir, 'records', '2025-09-30-2', 'changes.json'), 'utf8')).previous).toBe('2025-09-30');

    // A new season's surveys: the data changed, with the 2024 transitions added.
    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('  - surveys/brenhollow-2015-2024.csv', '  - surveys/brenhollow-2015-2024.csv\n  - new-2024.csv'));
    const next = sere(['season', dir, '--date', '2026-09-30']);
    expect(next.code).toBe(0);
    const changes = JSON.parse(readFileSync(join(dir, 'records', '2026-09-30', 'changes.json'), 'utf8'));
    expect(changes.dataChanged).toBe(true);
    // All ten years hold 507 one-step transitions (what `sere fit` reports on the demo table).
    expect(changes.transitions.now).toBe(507);
    expect(changes.transitions.now - changes.transitions.before).toBe(58);
    expect(changes.moved.length).toBeGreaterThan(0);
    // The same calendar year in both records: no-action ran 50 years from 2023 before, from 2024 now.
    expect(changes.format_version).toBe(2);
    const noAction = changes.forecasts.filter((f: { scenario: string }) => f.scenario === 'Brenhollow Saltings — no further management');
    expect(noAction.map((f: { year: number }) => f.year)).toEqual([2073, 2073, 2073, 2073, 2073]);
    // The split adds up: new data (new fit, 2023 start) plus moving the start (same draws) is the whole move.
    for (const f of changes.forecasts) {
      expect(f.effects.data + f.effects.start).toBeCloseTo(f.now.median - f.before.median, 12);
    }
    // 58 transitions more moved the rank-grass median far more than one year's later start did.
    const grass = noAction.find((f: { state: string }) => f.state === 'rank-grass');
    expect(Math.abs(grass.effects.data)).toBeGreaterThan(5 * Math.abs(grass.effects.start));
    expect(next.stdout).toContain('data changed: +58 transitions');
    // Both earlier records (data to 2023) are scored on 2024, now surveyed: every site from its own
    // 2023 state (or its last before, for the two plots missed in 2023), by each record's own chain.
    const scores = JSON.parse(readFileSync(join(dir, 'records', '2026-09-30', 'scores.json'), 'utf8'));
    expect(scores.format_version).toBe(2);
    expect(scores.records.map((r: { record: string }) => r.record)).toEqual(['2025-09-30', '2025-09-30-2']);
    const scored = scores.records[0];
    expect(scored.years.map((y: { year: number; origin: number }) => [y.origin, y.year])).toEqual([[2023, 2024]]);
    // The generator never misses the last year's survey: all 60 plots were surveyed in 2024.
    expect(scored.summary.sites).toBe(60);
    expect(scored.years[0].observed.reduce((a: number, b: number) => a + b, 0)).toBe(60);
    expect(scored.summary.coverage.bands).toBe(5);
    // Only no-action forecasts the chain alone (storm surges and the options file add events).
    expect(scored.scenarios).toEqual(['Brenhollow Saltings — no further management']);
    expect(scored.summary.skill.log.persistence).toBeGreaterThan(0);
    expect(scored.summary.skill.log.climatology).toBeGreaterThan(0.3);
    // Same fit, same scoring stream by record name: the two same-day records score alike within Monte Carlo noise.
    expect(Math.abs(scores.records[1].summary.chain.log - scored.summary.chain.log)).toBeLessThan(0.02);
    expect(next.stdout).toContain('Were earlier forecasts any good?');
    expect(sere(['season', '--replay', join(dir, 'records', '2026-09-30')]).code).toBe(0);
  }, 180_000); // five season runs (one a replay) of the built binary: 53–69 s at load 8–10 on the shared 2-core machine, over the 60 s default

  it('leaves earlier records untouched and writes nothing when the input is bad', () => {
    const dir = workspace();
    expect(sere(['season', dir, '--date', '2025-09-30']).code).toBe(0);
    const scenario = join(dir, 'scenarios', 'no-action.yaml');
    writeFileSync(scenario, readFileSync(scenario, 'utf8').replace('state: high-marsh', 'state: high-mash'));
    const bad = sere(['season', dir, '--date', '2025-10-01']);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain("no-action.yaml");
    expect(bad.stderr).toContain("unknown state 'high-mash'");
    expect(records(dir)).toEqual(['2025-09-30']);
  });

  it('says how to make a workspace when the folder has none', () => {
    const r = sere(['season', mkdtempSync(join(tmpdir(), 'sere-ws-'))]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('no sere-workspace.yaml in this folder — name the workspace folder, or create one with sere init FOLDER');
  });

  it('refuses to initialise a folder that is not empty', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-ws-'));
    writeFileSync(join(dir, 'notes.txt'), 'mine');
    const r = sere(['init', dir]);
    expect(r.code).toBe(1);
    expect(readdirSync(dir)).toEqual(['notes.txt']);
  });
});

describe('writing a record', () => {
  it('leaves no partial record when a write fails mid-way', () => {
    const parent = mkdtempSync(join(tmpdir(), 'sere-rec-'));
    const files = new Map([['a.json', '{}'], ['b/c.json', '{}'], ['d.json', '{}']]);
    let written = 0;
    const failing = (path: string, data: string | Buffer): void => {
      if (++written === 2) throw Object.assign(new Error('disk full'), { code: 'ENOSPC' });
      writeFileSync(path, data);
    };
    let error: unknown;
    try { writeFolderAtomic(join(parent, '2026-01-01'), files, failing); } catch (err) { error = err; }
    expect(error).toBeInstanceOf(SereError);
    expect((error as SereError).code).toBe('CANNOT_WRITE');
    expect(readdirSync(parent)).toEqual([]);
    writeFolderAtomic(join(parent, '2026-01-01'), files);
    expect(readdirSync(join(parent, '2026-01-01')).sort()).toEqual(['a.json', 'b', 'd.json']);
  });
});
