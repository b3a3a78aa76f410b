import { describe, expect, it } from 'vitest';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { SereError } from '../../src/errors.js';
import { buildPlan } from '../../src/engine/plan.js';

const file = (name: string): string => `test/fixtures/scenarios/${name}`;

function errorOf(name: string): SereError {
  try { loadScenario(file(name)); } catch (err) { if (err instanceof SereError) return err; throw err; }
  throw new Error('expected a SereError');
}

describe('a stratified scenario', () => {
  it('resolves areas, zone starts and zone-limited treatments; the plan weights zones by area and parcels within their zones', () => {
    const s = loadScenario(file('zones-good.yaml'));
    expect(s.zones!.names).toEqual(['clay', 'sand']);
    expect(Array.from(s.zones!.shares)).toEqual([0.4, 0.6]);
    expect(s.zones!.from).toBe('shares');
    expect(s.treatments[0]!.zones).toEqual([0]);
    // clay's latest (time 3): A in b; sand's: C in a (D last surveyed at 2, carried).
    const plan = buildPlan(s);
    expect(plan.subPopulations.map((g) => [g.zone, g.mask, g.weight])).toEqual([[0, 0, 0.2], [0, 1, 0.2], [1, 0, 0.6]]);
    expect(plan.zones).toBe(2);
  });

  const cases: [string, string, { line?: number; path?: string }][] = [
    ['zones-unknown-area.yaml', 'BAD_ZONES', { line: 7, path: 'areas.peat' }],
    ['zones-negative-area.yaml', 'BAD_ZONES', { line: 7, path: 'areas.clay' }],
    ['zones-negative-share.yaml', 'BAD_ZONES', { line: 7, path: 'areas.clay' }],
    ['zones-shares-sum.yaml', 'BAD_ZONES', { line: 7, path: 'areas' }],
    ['zones-mixed-units.yaml', 'BAD_ZONES', { line: 7, path: 'areas.sand' }],
    ['zones-mixed-kinds.yaml', 'BAD_ZONES', { line: 7, path: 'areas.sand' }],
    ['zones-unknown-name.yaml', 'BAD_ZONES', { line: 8, path: 'treatments[0].zones[0]' }],
    ['zones-not-zoned.yaml', 'BAD_ZONES', { line: 4, path: 'areas' }],
    ['zones-one-zone.yaml', 'BAD_ZONES', { line: 4, path: 'fit.pooling' }],
  ];
  for (const [name, code, place] of cases) {
    it(`${name} → ${code} at ${JSON.stringify(place)}`, () => {
      const err = errorOf(name);
      expect(err.code).toBe(code);
      expect(err.place).toMatchObject(place);
    });
  }
});

describe('a workspace', () => {
  it('keeps fit.pooling for its seasons, and a zoned fit of one zone is refused at that key', async () => {
    const { mkdtempSync, writeFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const { tmpdir } = await import('node:os');
    const { loadWorkspace, WORKSPACE_FILE } = await import('../../src/workspace/workspace.js');
    const { runSeason } = await import('../../src/workspace/season.js');
    const root = mkdtempSync(join(tmpdir(), 'sere-ws-'));
    writeFileSync(join(root, WORKSPACE_FILE), 'name: w\nsurveys: [s.csv]\nfit:\n  columns: { group: zone }\n  pooling: partial\nscenarios: [s.yaml]\nrecords: records\n');
    writeFileSync(join(root, 's.csv'), 'site,time,state,zone\na,1,x,only\na,2,y,only\nb,1,y,only\nb,2,y,only\n');
    writeFileSync(join(root, 's.yaml'), 'name: s\nhorizon: { years: 2 }\n');
    const ws = loadWorkspace(root);
    expect(ws.fitSettings.pooling).toBe('partial');
    try { await runSeason(ws, { date: '2025-01-01', fallbackSeed: 1 }); expect.unreachable(); } catch (err) {
      expect((err as SereError).code).toBe('BAD_ZONES');
      expect((err as SereError).place).toMatchObject({ line: 5, path: 'fit.pooling' });
    }
  });
});
