import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const sc = (name: string): string => `test/fixtures/scenarios/${name}`;

describe('--csv (built binary)', () => {
  it('forecast writes the tidy CSV; an existing file is kept (exit 1) unless --force', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-csv-'));
    const file = join(dir, 'f.csv');
    const r = sere(['forecast', sc('good.yaml'), '--csv', file]);
    expect(r.code).toBe(0);
    const lines = readFileSync(file, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('scenario,alternative,state,year,measure,statistic,value,unit');
    // 3 states × 6 years × 4 statistics + the target's threshold, chance, three timing rows and their
    // draws, already met, and the two chances it holds.
    expect(lines.length - 1).toBe(3 * 6 * 4 + 9);

    writeFileSync(file, 'mine\n');
    const chart = join(dir, 'c.svg');
    const refused = sere(['forecast', sc('good.yaml'), '--csv', file, '--chart', chart]);
    expect(refused.code).toBe(1);
    expect(refused.stderr.trim().split('\n').length).toBe(1);
    expect(readFileSync(file, 'utf8')).toBe('mine\n');
    // Refused before any output: the chart named beside it is not written either.
    expect(existsSync(chart)).toBe(false);
    expect(sere(['forecast', sc('good.yaml'), '--csv', file, '--force']).code).toBe(0);
    expect(readFileSync(file, 'utf8').split('\n')[0]).toBe(lines[0]);
  });

  it('compare writes shares, differences and chances; the same seed gives the same bytes', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-csv-'));
    const [a, b] = [join(dir, 'a.csv'), join(dir, 'b.csv')];
    expect(sere(['compare', sc('good.yaml'), sc('managed-lite.yaml'), '--csv', a]).code).toBe(0);
    expect(sere(['compare', sc('good.yaml'), sc('managed-lite.yaml'), '--csv', b]).code).toBe(0);
    const text = readFileSync(a, 'utf8');
    expect(readFileSync(b, 'utf8')).toBe(text);
    const rows = text.trim().split('\n').slice(1).map((l) => l.split(','));
    const measures = new Set(rows.map((r) => r[4]));
    for (const m of ['share', 'difference', 'chance_more', 'target_chance', 'target_outcome', 'target_years_difference']) expect(measures.has(m), m).toBe(true);
    // Shares every year for both (6 years × 3 states × 4 statistics each).
    expect(rows.filter((r) => r[4] === 'share').length).toBe(2 * 6 * 3 * 4);
  });
});
