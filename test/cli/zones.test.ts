import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sereInProcess as sere } from './in-process.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { zonePooling } from '../../src/fit/zones.js';

const fx = (name: string): string => `test/fixtures/${name}`;
const tmp = (): string => mkdtempSync(join(tmpdir(), 'sere-zones-'));

describe('sere fit --pooling', () => {
  it('none holds exactly the fits --by writes, in one file', async () => {
    const dir = tmp();
    expect((await sere(['fit', fx('grouped.csv'), '--by', 'soil', '--out', join(dir, 'by.json')])).code).toBe(0);
    const r = await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'none', '--out', join(dir, 'none.json')]);
    expect(r.code).toBe(0);
    const none = JSON.parse(readFileSync(join(dir, 'none.json'), 'utf8'));
    expect(none.zones.pooling).toBe('none');
    expect(none.zones.zones.map((z: { name: string }) => z.name)).toEqual(['clay', 'sand']);
    for (const [z, name] of ['clay', 'sand'].entries()) {
      expect(none.zones.zones[z].fit).toEqual(JSON.parse(readFileSync(join(dir, `by-${name}.json`), 'utf8')));
    }
    // The pooled part is the plain fit of the whole table.
    const plain = JSON.parse((await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--json'])).stdout);
    const { zones: _, ...pooledPart } = none;
    expect(pooledPart).toEqual(plain);
  });

  it('partial writes each zone\'s pull and rows, and reads back to the same fit', async () => {
    const dir = tmp();
    const out = join(dir, 'partial.json');
    const r = await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'partial', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('partially pooled');
    const json = JSON.parse(readFileSync(out, 'utf8'));
    const fit = loadFit(out);
    expect(fit.zones!.zones.map((z) => z.name)).toEqual(['clay', 'sand']);
    const p = zonePooling(fit);
    json.zones.zones.forEach((z: { pull: number[]; probabilities: number[][] }, n: number) => {
      expect(z.pull).toEqual(Array.from(p.pull[n]!));
      expect(z.probabilities.flat()).toEqual(Array.from(p.rows[n]!));
    });
    // clay a→(a,b) = (0,1), sand (2,0): the MLE κ of row a is finite, each zone's row lies between its own and the shared.
    expect(json.zones.shared.kappa[0]).toBeGreaterThan(0);
    expect(Array.from(fit.zones!.zones[1]!.fit.counts)).toEqual([2, 0, 0, 1]);
  });

  it('partial reports its sampler\'s R̂ and ESS (fit table, fit file, sere check on the file: same seed, same numbers)', async () => {
    const dir = tmp();
    const out = join(dir, 'partial.json');
    const r = await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'partial', '--seed', '5', '--out', out]);
    expect(r.code).toBe(0);
    const s = JSON.parse(readFileSync(out, 'utf8')).zones.posterior_sampler;
    expect([s.seed, s.chains, s.warm_up, s.kept, s.thin]).toEqual([5, 4, 100, 250, 3]);
    expect(s.rhat_max).toBeGreaterThan(0.99);
    expect(s.ess_min).toBeGreaterThan(0);
    // Two states a, b: κ and the shared row of a varied; every R̂ and ESS is a number or null (never varied).
    expect(s.kappa_rhat).toHaveLength(2);
    expect(r.stdout).toContain(`R̂ ${s.rhat_max.toFixed(4)}`);
    const zone = JSON.parse(readFileSync(out, 'utf8')).zones.zones[0];
    expect(zone.sampler_rhat).toHaveLength(2);
    const check = JSON.parse((await sere(['check', out, '--seed', '5', '--json'])).stdout);
    expect(check.zone_sampler.rhat_max).toBe(s.rhat_max);
    expect(check.zone_sampler.zones[0].ess).toEqual(zone.sampler_ess);
    // Without partial pooling neither file nor check has the key.
    const none = JSON.parse((await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'none', '--seed', '5', '--json'])).stdout);
    expect(none.zones.posterior_sampler).toBeUndefined();
  });

  it('refuses partial pooling of one zone, without a zone column, and with --by, in one line each', async () => {
    const dir = tmp();
    const one = join(dir, 'one.csv');
    writeFileSync(one, 'site,time,state,soil\nA,1,a,clay\nA,2,b,clay\nB,1,b,clay\nB,2,a,clay\n');
    const r1 = await sere(['fit', one, '--group-column', 'soil', '--pooling', 'partial']);
    expect(r1.code).toBe(1);
    expect(r1.stderr).toMatch(/^sere: .*BAD_ZONES|two zones/);
    expect(r1.stderr.trim().split('\n')).toHaveLength(1);
    const r2 = await sere(['fit', fx('grouped.csv'), '--pooling', 'partial']);
    expect(r2.code).toBe(1);
    expect(r2.stderr).toContain('--pooling');
    const r3 = await sere(['fit', fx('grouped.csv'), '--by', 'soil', '--pooling', 'none', '--out', join(dir, 'x.json')]);
    expect(r3.code).toBe(1);
    // Observer error fits one pooled chain: zones pooled partially with an error matrix are refused, not ignored.
    const errors = join(dir, 'accuracy.csv');
    writeFileSync(errors, 'recorded,verified,n\na,a,9\nb,a,1\nb,b,10\n');
    const r4 = await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'partial', '--errors', errors, '--debug']);
    expect(r4.code).toBe(1);
    expect(r4.stderr).toContain('BAD_ZONES');
  });

  it('a fit file whose zones do not add up, or a zone without sites, is refused at its key', async () => {
    const dir = tmp();
    const out = join(dir, 'p.json');
    await sere(['fit', fx('grouped.csv'), '--group-column', 'soil', '--pooling', 'partial', '--out', out]);
    const json = JSON.parse(readFileSync(out, 'utf8'));
    json.zones.zones[1].fit.counts[0][0] = 3; // site_counts no longer add up to it
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify(json, null, 2));
    expect(() => loadFit(bad)).toThrow(expect.objectContaining({ code: 'BAD_FIT_FILE' }));
    try { loadFit(bad); } catch (err) { expect((err as { place: { path: unknown } }).place.path).toBe('zones.zones[1].fit.site_counts'); }
    const json2 = JSON.parse(readFileSync(out, 'utf8'));
    json2.zones.zones = [json2.zones.zones[0]];
    writeFileSync(bad, JSON.stringify(json2, null, 2));
    try { loadFit(bad); expect.unreachable(); } catch (err) {
      expect((err as { code: string }).code).toBe('BAD_FIT_FILE');
      expect((err as { place: { path: unknown } }).place.path).toBe('zones.zones');
    }
  });
});

describe('commands on a zoned scenario', () => {
  it('compare and effort run (effort by zone: sites split 0.4 / 0.6 by the areas)', async () => {
    const c = await sere(['compare', 'test/fixtures/scenarios/zones-good.yaml', 'test/fixtures/scenarios/zones-good.yaml']);
    expect(c.code).toBe(0);
    const e = await sere(['effort', 'test/fixtures/scenarios/zones-good.yaml', '--sites', '5', '--seasons', '1', '--replicates', '2', '--draws', '50', '--seed', '2', '--json']);
    expect(e.code).toBe(0);
    const j = JSON.parse(e.stdout);
    // Quotas 2 and 3 exactly.
    expect(j.cells[0].zones.map((z: { name: string; sites: number }) => [z.name, z.sites])).toEqual([['clay', 2], ['sand', 3]]);
  });
});

describe('year-to-year variation with zones fitted each on their own', () => {
  it('reports each zone\'s own κ (variation_by_zone), not one zone\'s as the landscape\'s', async () => {
    const dir = tmp();
    const scenario = join(dir, 'none.yaml');
    writeFileSync(scenario, readFileSync('scenarios/brenhollow/zoned.yaml', 'utf8')
      .replace('data: zoned-surveys.csv', `data: ${join(process.cwd(), 'scenarios/brenhollow/zoned-surveys.csv')}`)
      .replace('pooling: partial', 'pooling: none').replace('draws: 4000', 'draws: 300'));
    const r = await sere(['forecast', scenario, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout).scenarios[0];
    expect(out.variation).toBeUndefined();
    expect(Object.keys(out.variation_by_zone)).toEqual(['creekside', 'landward', 'midmarsh']);
    // Landward's plots never leave rank grass in the record (its row does not vary); creekside's do.
    expect(out.variation_by_zone.landward['rank-grass'].status).toBe('never-left');
    expect(out.variation_by_zone.creekside['rank-grass'].status).toBe('estimated');
    // Each zone's κ comes from its own record: the zones' low-marsh medians differ.
    const lowMarsh = ['creekside', 'landward', 'midmarsh'].map((z) => out.variation_by_zone[z]['low-marsh'].kappa.median);
    expect(new Set(lowMarsh).size).toBe(3);
  });
});
