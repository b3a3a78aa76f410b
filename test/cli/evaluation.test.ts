import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const demo = 'scenarios/brenhollow/surveys.csv';

describe('sere hindcast and sere effort (built binary)', () => {
  it('hindcast --json summarises coverage and scores by years ahead', () => {
    const r = sere(['hindcast', demo, '--years', '1,3', '--draws', '150', '--seed', '2', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.format).toBe('sere-hindcast');
    expect(j.summary.map((s: { years: number; cases: number }) => [s.years, s.cases])).toEqual([[1, 8], [3, 6]]);
    expect(j.format_version).toBe(2);
    expect(Object.keys(j.cases[0]).sort()).toEqual(['chain', 'climatology', 'covered', 'high', 'low', 'observed', 'origin',
      'persistence', 'sites', 'steps', 'target', 'unscored']);
    expect(Object.keys(j.summary[0]).sort()).toEqual(['cases', 'chain', 'climatology', 'coverage', 'persistence', 'sites', 'skill', 'steps', 'years']);
    expect(Object.keys(j.summary[0].coverage).sort()).toEqual(['bands', 'covered', 'flag', 'level', 'p']);
    expect(sere(['hindcast', demo, '--years', '1,3', '--draws', '150', '--seed', '2', '--json']).stdout).toBe(r.stdout);
  });

  it('effort --json gives band widths on the grid, and rejects a malformed grid', () => {
    const r = sere(['effort', 'scenarios/brenhollow/new-cell.yaml', '--sites', '30,120', '--seasons', '2', '--replicates', '3', '--draws', '100', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.cells.map((c: { sites: number; seasons: number }) => [c.sites, c.seasons])).toEqual([[30, 2], [120, 2]]);
    expect(j.seed).toBe(7);
    expect(sere(['effort', 'scenarios/brenhollow/new-cell.yaml', '--sites', 'many']).code).toBe(2);
    expect(j.zones).toBeUndefined();
  });

  it('effort on a stratified scenario gives the landscape and each zone, sites split by area', () => {
    const r = sere(['effort', 'scenarios/brenhollow/zoned.yaml', '--sites', '30', '--seasons', '1', '--replicates', '2', '--draws', '100', '--seed', '3', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.zones.map((z: { name: string; share: number }) => [z.name, z.share])).toEqual([['creekside', 120 / 425], ['landward', 95 / 425], ['midmarsh', 210 / 425]]);
    expect(j.cells[0].zones.map((z: { name: string; sites: number }) => [z.name, z.sites])).toEqual([['creekside', 8], ['landward', 7], ['midmarsh', 15]]);
    expect(Object.keys(j.zones[0].current)).toEqual(['mudflat', 'pioneer', 'low-marsh', 'high-marsh', 'rank-grass']);
  });
});
