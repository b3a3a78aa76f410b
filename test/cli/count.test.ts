import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sereInProcess } from './in-process.js';
import { loadFit } from '../../src/fit/load-fit.js';

const DEMO = 'scenarios/brenhollow/surveys.csv';
const STATES = 'mudflat,pioneer,low-marsh,high-marsh,rank-grass';
const dir = mkdtempSync(join(tmpdir(), 'sere-count-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const at = (name: string): string => join(dir, name);
const sha = (file: string): string => createHash('sha256').update(readFileSync(file)).digest('hex');
const code = (stderr: string): string | undefined => /\[([A-Z_]+)\]/.exec(stderr)?.[1];

/** The demo table split by site: the first `cut` sites' rows in one file, the rest in another. */
function shards(cut: number, overlap = false): [string, string] {
  const [header, ...rows] = readFileSync(DEMO, 'utf8').trim().split('\n');
  const sites = [...new Set(rows.map((r) => r.split(',')[0]!))].sort();
  const first = new Set(sites.slice(0, cut));
  const a = rows.filter((r) => first.has(r.split(',')[0]!));
  const b = rows.filter((r) => !first.has(r.split(',')[0]!) || (overlap && r.startsWith(sites[0]!) && r.includes(',2024,')));
  writeFileSync(at(`a${cut}${overlap}.csv`), [header, ...a].join('\n') + '\n');
  writeFileSync(at(`b${cut}${overlap}.csv`), [header, ...b].join('\n') + '\n');
  return [at(`a${cut}${overlap}.csv`), at(`b${cut}${overlap}.csv`)];
}

describe('sere count', () => {
  it('writes the counts table and its sidecar, and never overwrites them unasked', async () => {
    const out = at('counts.csv');
    const r = await sereInProcess(['count', DEMO, '--out', out, '--group-column', 'zone']);
    expect(r.code).toBe(0);
    const csv = readFileSync(out, 'utf8');
    expect(csv.split('\n')[0]).toBe('site_group,from_state,to_state,gap,to_time,step,n');
    const sources = JSON.parse(readFileSync(at('counts.sources.json'), 'utf8'));
    expect(sources.inputs).toEqual([{ file: DEMO, kind: 'survey table', sha256: sha(DEMO) }]);
    expect(sources.counts.sha256).toBe(sha(out));
    // The demo: 60 plots, 583 surveys, 507 one-year transitions, 15 + 1 pairs 2 and 3 years apart (sere fit prints the same).
    expect(sources.totals).toEqual({ sites: 60, surveys: 583, transitions: 507, other_pairs: 16, repeated_rows: 0, sites_by_last_survey: 60 });
    const again = await sereInProcess(['count', DEMO, '--out', out, '--debug']);
    expect(again.code).toBe(1);
    expect(code(again.stderr)).toBe('FILE_EXISTS');
    expect(readFileSync(out, 'utf8')).toBe(csv);
    expect((await sereInProcess(['count', DEMO, '--out', out, '--force'])).code).toBe(0);
    expect(readFileSync(out, 'utf8')).not.toBe(csv);
  });

  it('shards split by site add up to the whole table, per-site counts included', async () => {
    const [a, b] = shards(25);
    for (const [input, out] of [[a, 'sa.csv'], [b, 'sb.csv'], [DEMO, 'whole.csv']] as const) {
      expect((await sereInProcess(['count', input, '--per-site', '--states', STATES, '--out', at(out)])).code).toBe(0);
    }
    const merged = await sereInProcess(['count', at('sa.csv'), at('sb.csv'), '--states', STATES, '--out', at('merged.csv')]);
    expect(merged.code).toBe(0);
    expect(readFileSync(at('merged.csv'), 'utf8')).toBe(readFileSync(at('whole.csv'), 'utf8'));
    const sources = JSON.parse(readFileSync(at('merged.sources.json'), 'utf8'));
    expect(sources.inputs.map((i: { sha256: string }) => i.sha256)).toEqual([sha(at('sa.csv')), sha(at('sb.csv'))]);
    expect(sources.totals.sites).toBe(60);
  });

  it('a shard without last-survey rows (counted before they existed) drops the others\' too, and the sum still fits', async () => {
    const [a, b] = shards(20);
    for (const [input, out] of [[a, 'la.csv'], [b, 'lb.csv']] as const) {
      expect((await sereInProcess(['count', input, '--states', STATES, '--out', at(out)])).code).toBe(0);
    }
    // Strip shard a's last-survey rows (a from_state and no to_state), as an older sere wrote it.
    const lines = readFileSync(at('la.csv'), 'utf8').split('\n');
    const old = lines.filter((l) => !/^[^,]+,,/.test(l));
    expect(old.length).toBeLessThan(lines.length);
    writeFileSync(at('la-old.csv'), old.join('\n'));
    const both = await sereInProcess(['count', at('la.csv'), at('lb.csv'), '--states', STATES, '--out', at('lm-new.csv')]);
    const mixed = await sereInProcess(['count', at('la-old.csv'), at('lb.csv'), '--states', STATES, '--out', at('lm-old.csv')]);
    expect(both.code).toBe(0);
    expect(mixed.code).toBe(0);
    expect(JSON.parse(readFileSync(at('lm-new.sources.json'), 'utf8')).totals.sites_by_last_survey).toBe(60);
    expect(JSON.parse(readFileSync(at('lm-old.sources.json'), 'utf8')).totals.sites_by_last_survey).toBe(0);
    expect((await sereInProcess(['fit', at('lm-old.csv'), '--states', STATES])).code).toBe(0);
  });

  it("adds shards in their own step, refuses another, and refuses an existing --out before counting", async () => {
    const [a, b] = shards(30);
    for (const [input, out] of [[a, 's5a.csv'], [b, 's5b.csv'], [DEMO, 's5.csv']] as const) {
      expect((await sereInProcess(['count', input, '--step', '2', '--out', at(out)])).code).toBe(0);
    }
    expect((await sereInProcess(['count', at('s5a.csv'), at('s5b.csv'), '--out', at('s5m.csv')])).code).toBe(0);
    expect(readFileSync(at('s5m.csv'), 'utf8')).toBe(readFileSync(at('s5.csv'), 'utf8'));
    const other = await sereInProcess(['count', at('s5a.csv'), at('s5b.csv'), '--step', '1', '--debug']);
    expect(code(other.stderr)).toBe('BAD_COUNTS');
    writeFileSync(at('taken.sources.json'), '{}');
    const taken = await sereInProcess(['count', DEMO, '--out', at('taken.csv'), '--debug']);
    expect(code(taken.stderr)).toBe('FILE_EXISTS');
    expect(existsSync(at('taken.csv'))).toBe(false);
  });

  it('refuses a site found in two shards (with per-site counts), writing nothing', async () => {
    const [a, b] = shards(25, true);
    await sereInProcess(['count', a, '--per-site', '--out', at('oa.csv')]);
    await sereInProcess(['count', b, '--per-site', '--out', at('ob.csv')]);
    const r = await sereInProcess(['count', at('oa.csv'), at('ob.csv'), '--out', at('om.csv'), '--debug']);
    expect(r.code).toBe(1);
    expect(code(r.stderr)).toBe('SITE_IN_TWO_SHARDS');
    expect(existsSync(at('om.csv')) || existsSync(at('om.sources.json'))).toBe(false);
  });

  it('refuses the same pooled counts given twice (they would count every transition twice), writing nothing', async () => {
    await sereInProcess(['count', DEMO, '--out', at('once.csv')]);
    const r = await sereInProcess(['count', at('once.csv'), at('once.csv'), '--out', at('twice.csv'), '--debug']);
    expect(r.code).toBe(1);
    expect(code(r.stderr)).toBe('BAD_COUNTS');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(at('twice.csv')) || existsSync(at('twice.sources.json'))).toBe(false);
  });

  it('survey tables given together are one table: a site in two of them is joined', async () => {
    const [a, b] = shards(25, true);
    const together = await sereInProcess(['count', a, b]);
    const whole = await sereInProcess(['count', DEMO]);
    expect(together.stdout).toBe(whole.stdout);
  });
});

describe('fitting from counts', () => {
  it('sere fit reads a counts table by its header and gives the survey fit', async () => {
    await sereInProcess(['count', DEMO, '--out', at('fc.csv')]);
    // One seed for the gap sampler both fits run (the demo has pairs further apart than one step).
    const direct = JSON.parse((await sereInProcess(['fit', DEMO, '--states', STATES, '--seed', '7', '--json'])).stdout);
    const counted = JSON.parse((await sereInProcess(['fit', at('fc.csv'), '--states', STATES, '--seed', '7', '--json'])).stdout);
    for (const key of ['counts', 'probabilities', 'posterior', 'stationary', 'period_counts', 'posterior_sampler']) expect(counted[key]).toEqual(direct[key]);
    // Every demo site was surveyed at the latest time, so nothing is carried forward by either.
    expect(counted.latest).toEqual(direct.latest);
    // A counts table does not keep which sites were surveyed once.
    expect({ ...counted.data, single_survey_sites: 0 }).toEqual({ ...direct.data, single_survey_sites: 0 });
    expect(counted.site_counts).toBeNull();
    // Its fit file reads back (pooled: no site_counts, data.sites kept) and says it is pooled.
    writeFileSync(at('fc.json'), JSON.stringify(counted));
    const reread = loadFit(at('fc.json'));
    expect(reread.pooledSites).toBe(60);
    expect(reread.sites.length).toBe(0);
  });

  it("takes the counts table's own step unless --step is given, which must then match", async () => {
    // Surveys every other year (the demo's gaps of one year are not whole 2-year steps).
    const biennial = at('biennial.csv');
    writeFileSync(biennial, 'site,time,state\nA,2000,a\nA,2002,b\nA,2004,b\nB,2000,b\nB,2002,b\nB,2006,a\n');
    await sereInProcess(['count', biennial, '--step', '2', '--out', at('step2.csv')]);
    const direct = JSON.parse((await sereInProcess(['fit', biennial, '--step', '2', '--seed', '3', '--json'])).stdout);
    const counted = JSON.parse((await sereInProcess(['fit', at('step2.csv'), '--seed', '3', '--json'])).stdout);
    expect(counted.step).toBe(2);
    expect(counted.counts).toEqual(direct.counts);
    expect(counted.data.gap_counts).toEqual(direct.data.gap_counts);
    expect(counted.data.pairs_by_gap).toEqual([{ gap: 1, pairs: 3 }, { gap: 2, pairs: 1 }]);
    const wrong = await sereInProcess(['fit', at('step2.csv'), '--step', '1', '--debug']);
    expect(wrong.code).toBe(1);
    expect(code(wrong.stderr)).toBe('BAD_OPTION');
  });

  it('a scenario with data: counts.csv forecasts as with the survey table', async () => {
    await sereInProcess(['count', DEMO, '--out', at('sc.csv')]);
    const yaml = readFileSync('scenarios/brenhollow/no-action.yaml', 'utf8').replace('data: surveys.csv', 'data: sc.csv').replace('draws: 4000', 'draws: 300');
    writeFileSync(at('no-action.yaml'), yaml);
    writeFileSync(at('surveys.csv'), readFileSync(DEMO));
    writeFileSync(at('direct.yaml'), yaml.replace('data: sc.csv', 'data: surveys.csv'));
    const a = await sereInProcess(['forecast', at('no-action.yaml'), '--json']);
    const b = await sereInProcess(['forecast', at('direct.yaml'), '--json']);
    expect(a.code).toBe(0);
    // Everything but the data file's name and hash (and the scenario file's) is the same.
    const strip = (text: string): unknown => JSON.parse(text, (key, value) => (['data', 'file', 'sha256'].includes(key) ? undefined : value));
    const [ja, jb] = [strip(a.stdout), strip(b.stdout)] as { scenarios: unknown[] }[];
    expect(ja!.scenarios.length).toBe(1);
    expect(ja).toEqual(jb);
  });

  it('features that need per-site data say so when the counts are pooled', async () => {
    await sereInProcess(['count', DEMO, '--out', at('pooled.csv')]);
    const hindcast = await sereInProcess(['hindcast', at('pooled.csv'), '--seed', '1', '--debug']);
    expect(hindcast.code).toBe(1);
    expect(code(hindcast.stderr)).toBe('NO_SITE_COUNTS');
    expect(hindcast.stderr.trim().split('\n')).toHaveLength(1);
    const yaml = readFileSync('scenarios/brenhollow/no-action.yaml', 'utf8').replace('data: surveys.csv', 'data: pooled.csv').replace('source: posterior', 'source: bootstrap');
    writeFileSync(at('boot.yaml'), yaml);
    const boot = await sereInProcess(['forecast', at('boot.yaml'), '--debug']);
    expect(boot.code).toBe(1);
    expect(code(boot.stderr)).toBe('NO_SITE_COUNTS');
    const check = await sereInProcess(['check', at('pooled.csv'), '--states', STATES, '--seed', '1', '--json']);
    expect(check.code).toBe(0);
    const unavailable: string[] = JSON.parse(check.stdout).tests.not_tested;
    expect(unavailable.some((u) => u.startsWith('order 1 vs 2: a counts table'))).toBe(true);
  });
});

describe('sere fit --by on a counts table', () => {
  it('gives the same fits, files and groups test as --by on the survey table', async () => {
    const counts = at('by-zone.csv');
    expect((await sereInProcess(['count', DEMO, '--group-column', 'zone', '--per-site', '--states', STATES, '--out', counts])).code).toBe(0);
    const viaSurvey = await sereInProcess(['fit', DEMO, '--by', 'zone', '--states', STATES, '--out', at('s.json')]);
    const viaCounts = await sereInProcess(['fit', counts, '--by', 'zone', '--states', STATES, '--out', at('c.json')]);
    expect(viaSurvey.code).toBe(0);
    expect(viaCounts.code).toBe(0);
    const zones = ['north', 'south'];
    for (const zone of zones) {
      const a = JSON.parse(readFileSync(at(`s-${zone}.json`), 'utf8'));
      const b = JSON.parse(readFileSync(at(`c-${zone}.json`), 'utf8'));
      expect(b.counts).toEqual(a.counts);
      expect(b.latest).toEqual(a.latest);
      expect(b.estimate).toEqual(a.estimate);
      expect(b.data.sites).toBe(a.data.sites);
      expect(b.group_column).toBe('zone');
    }
    // The groups test (per-site counts) and its table: the same numbers, only the file named differs.
    expect(viaCounts.stdout.replaceAll(counts, 'X').replaceAll(at('c-'), 'OUT-')).toBe(viaSurvey.stdout.replaceAll(DEMO, 'X').replaceAll(at('s-'), 'OUT-'));
    expect(viaCounts.stdout).toMatch(/simulated p 0\.\d+/);
  });

  it('refuses a counts table counted without groups', async () => {
    const counts = at('no-groups.csv');
    expect((await sereInProcess(['count', DEMO, '--out', counts])).code).toBe(0);
    const r = await sereInProcess(['fit', counts, '--by', 'zone', '--out', at('n.json'), '--debug']);
    expect(r.code).toBe(1);
    expect(code(r.stderr)).toBe('BAD_OPTION');
  });
});
