import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';

const STATES = ['mudflat', 'pioneer', 'low-marsh', 'high-marsh', 'rank-grass'];

/** The zoned demo workspace made light for tests: 300 draws, the surveys split into 2015–2023 and 2024. */
function zonedWorkspace(): string {
  const dir = join(mkdtempSync(join(tmpdir(), 'sere-zws-')), 'brenhollow');
  expect(sere(['init', dir, '--zoned']).code).toBe(0);
  const scenario = join(dir, 'scenarios', 'zoned.yaml');
  writeFileSync(scenario, readFileSync(scenario, 'utf8').replace('draws: 4000', 'draws: 300'));
  const table = join(dir, 'surveys', 'brenhollow-zones-2015-2024.csv');
  const [header, ...rows] = readFileSync(table, 'utf8').trim().split('\n');
  writeFileSync(table, [header, ...rows.filter((r) => !r.includes(',2024,'))].join('\n') + '\n');
  writeFileSync(join(dir, 'new-2024.csv'), [header, ...rows.filter((r) => r.includes(',2024,'))].join('\n') + '\n');
  return dir;
}

/** Each zone's one-step transition counts (from × to) and the counts of its surveys at the table's latest time, tallied here from the CSV text itself. */
function tallyByZone(csv: string): Map<string, { counts: number[][]; latest: number[] }> {
  const bySite = new Map<string, { zone: string; surveys: [number, number][] }>();
  for (const line of csv.trim().split('\n').slice(1)) {
    const [site, time, state, zone] = line.split(',');
    const entry = bySite.get(site!) ?? { zone: zone!, surveys: [] };
    entry.surveys.push([Number(time), STATES.indexOf(state!)]);
    bySite.set(site!, entry);
  }
  const out = new Map<string, { counts: number[][]; latest: number[] }>();
  const last = Math.max(...[...bySite.values()].flatMap((s) => s.surveys.map((v) => v[0])));
  for (const { zone, surveys } of bySite.values()) {
    const z = out.get(zone) ?? { counts: STATES.map(() => STATES.map(() => 0)), latest: STATES.map(() => 0) };
    surveys.sort((a, b) => a[0] - b[0]);
    for (let n = 1; n < surveys.length; n++) if (surveys[n]![0] - surveys[n - 1]![0] === 1) z.counts[surveys[n - 1]![1]]![surveys[n]![1]]! += 1;
    if (surveys[surveys.length - 1]![0] === last) z.latest[surveys[surveys.length - 1]![1]]! += 1;
    out.set(zone, z);
  }
  return out;
}

const json = (path: string): any => JSON.parse(readFileSync(path, 'utf8')); // eslint-disable-line @typescript-eslint/no-explicit-any

describe('a zoned workspace (sere init --zoned, built binary)', () => {
  it('keeps each zone\'s counts in every record, splits what changed, scores each zone with its chain and the landscape, and replays byte for byte', () => {
    const dir = zonedWorkspace();
    expect(readFileSync(join(dir, 'sere-workspace.yaml'), 'utf8')).toMatch(/^ {2}pooling: partial/m);
    const run = sere(['season', dir, '--date', '2025-03-01']);
    expect(run.code).toBe(0);
    // The season prints each zone's horizon row (2053: 30 years after the 2023 survey) under the landscape's.
    for (const zone of ['creekside', 'landward', 'midmarsh']) expect(run.stdout).toMatch(new RegExp(`│ ${zone} +│ 2053 │`));
    const first = join(dir, 'records', '2025-03-01');
    const firstFit = json(join(first, 'fit.json'));
    const firstTally = tallyByZone(readFileSync(join(dir, 'surveys', 'brenhollow-zones-2015-2024.csv'), 'utf8'));
    expect(firstFit.zones.pooling).toBe('partial');
    expect(firstFit.zones.zones.map((z: { name: string }) => z.name)).toEqual(['creekside', 'landward', 'midmarsh']);
    for (const zone of firstFit.zones.zones) {
      expect(zone.fit.counts).toEqual(firstTally.get(zone.name)!.counts);
      expect(zone.fit.latest).toMatchObject({ time: 2023, counts: firstTally.get(zone.name)!.latest });
      expect(zone.fit.input.file).toBe('surveys/brenhollow-zones-2015-2024.csv'); // as the workspace names it: replayable anywhere
    }
    // The stratified forecast: the zones summed by area (120, 210, 95 ha), year-to-year variation on.
    const forecast = json(join(first, 'forecasts', 'scenarios-zoned.json')).scenarios[0];
    expect(forecast.years[0]).toBe(2023);
    expect(forecast.years.at(-1)).toBe(2053);
    expect(forecast.zones).toMatchObject({ pooling: 'partial', column: 'zone', shares_from: 'areas', unit: 'ha' });
    expect(forecast.zones.zones.map((z: { name: string; share: number; area: number }) => [z.name, z.area, z.share]))
      .toEqual([['creekside', 120, 120 / 425], ['landward', 95, 95 / 425], ['midmarsh', 210, 210 / 425]]);
    for (const zone of forecast.zones.zones) {
      const latest = firstTally.get(zone.name)!.latest;
      const sites = latest.reduce((a, b) => a + b, 0);
      STATES.forEach((state, i) => expect(zone.start[state]).toBeCloseTo(latest[i]! / sites, 15)); // each zone from its own 2023 mix
      for (const state of STATES) expect(zone.shares[state].median).toHaveLength(31); // each zone's own bands, every year
    }

    const wsFile = join(dir, 'sere-workspace.yaml');
    writeFileSync(wsFile, readFileSync(wsFile, 'utf8').replace('  - surveys/brenhollow-zones-2015-2024.csv', '  - surveys/brenhollow-zones-2015-2024.csv\n  - new-2024.csv'));
    const second = sere(['season', dir, '--date', '2025-09-30']);
    expect(second.code).toBe(0);
    const record = join(dir, 'records', '2025-09-30');
    const fit = json(join(record, 'fit.json'));
    const all = tallyByZone(readFileSync(join(dir, 'surveys', 'brenhollow-zones-2015-2024.csv'), 'utf8')
      + readFileSync(join(dir, 'new-2024.csv'), 'utf8').split('\n').slice(1).join('\n'));
    for (const zone of fit.zones.zones) {
      expect(zone.fit.counts).toEqual(all.get(zone.name)!.counts);
      expect(zone.fit.latest).toMatchObject({ time: 2024, counts: all.get(zone.name)!.latest });
    }
    // The pooled counts are the zones' counts added up (90 plots, 30 a zone, 88 new transitions).
    const sum = STATES.map((_, i) => STATES.map((__, j) => fit.zones.zones.reduce((t: number, z: { fit: { counts: number[][] } }) => t + z.fit.counts[i]![j]!, 0)));
    expect(fit.counts).toEqual(sum);
    const changes = json(join(record, 'changes.json'));
    expect(changes.transitions.now - changes.transitions.before).toBe(88);
    expect(changes.forecasts).toHaveLength(5);
    for (const f of changes.forecasts) {
      expect(f.year).toBe(2053);
      // The median's move splits exactly into the new data's effect and the moved start's.
      expect(f.effects.data + f.effects.start).toBeCloseTo(f.now.median - f.before.median, 12);
    }
    // The earlier record is scored on the 2024 surveys of all 90 plots, from each plot's 2023 state,
    // each zone's plots with that zone's chain; the landscape is the zones' plots added up.
    const scores = json(join(record, 'scores.json')).records;
    expect(scores).toHaveLength(1);
    const years = scores[0].years;
    expect(years.map((y: { zone: string; year: number; origin: number; sites: number }) => [y.zone, y.origin, y.year, y.sites]))
      .toEqual([['creekside', 2023, 2024, 30], ['landward', 2023, 2024, 30], ['midmarsh', 2023, 2024, 30]]);
    for (const y of years) expect(y.observed).toEqual(all.get(y.zone)!.latest);
    expect(years.reduce((t: number, y: { unscored: number }) => t + y.unscored, 0)).toBe(0);
    expect(scores[0].summary.sites).toBe(90);
    expect(scores[0].summary.cases).toBe(3);
    expect(scores[0].zones.map((z: { zone: string; summary: { sites: number } }) => [z.zone, z.summary.sites]))
      .toEqual([['creekside', 30], ['landward', 30], ['midmarsh', 30]]);
    for (const key of ['log', 'brier']) {
      const weighted = years.reduce((t: number, y: { sites: number; chain: Record<string, number> }) => t + y.sites * y.chain[key]!, 0) / 90;
      expect(scores[0].summary.chain[key]).toBeCloseTo(weighted, 12);
    }
    // Coverage counts every zone's five state bands.
    expect(scores[0].summary.coverage.bands).toBe(15);

    for (const r of [first, record]) {
      const replay = sere(['season', '--replay', r]);
      expect(replay.stderr).toBe('');
      expect(replay.code).toBe(0);
    }
  }, 240_000);

  it('--zoned is the demo: with --from it is a usage error', () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'sere-zws-')), 'w');
    expect(sere(['init', dir, '--zoned', '--from', 'scenarios/brenhollow/zoned-surveys.csv']).code).toBe(2);
  });
});
