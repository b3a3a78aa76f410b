import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { sereInProcess } from './in-process.js';
import { smallStack, tempFolder } from '../data/raster/raster-fixtures.js';
import { StripTiffWriter, projectedGeoKeys } from '../../src/report/geotiff-writer.js';

const temp = tempFolder('sere-cli-raster-');
afterAll(() => temp.remove());
const rel = (file: string): string => relative(process.cwd(), file);

describe('sere with a raster stack', () => {
  const folder = join(temp.folder, 'stack');
  const stack = rel(smallStack(folder));

  it('fit --out writes a counts-only fit file that loads again and forecasts; the bootstrap says it needs per-site data', async () => {
    const out = join(folder, 'fit.json');
    const fit = await sereInProcess(['fit', stack, '--out', rel(out), '--states', 'bare,sward,heath,scrub']);
    expect(fit.code).toBe(0);
    expect(fit.stdout).toContain('(pooled counts, no per-site data)');
    const json = JSON.parse(readFileSync(out, 'utf8')) as { site_counts: unknown; data: { sites: number; transitions: number }; latest: { sites: number } };
    expect(json.site_counts).toBeNull();
    expect(json.data.sites).toBeGreaterThanOrEqual(json.latest.sites);
    expect(json.data.transitions).toBeGreaterThan(2000);
    expect(json.latest.sites).toBeGreaterThan(900);
    writeFileSync(join(folder, 'from-fit.yaml'), 'data: fit.json\nhorizon: { steps: 3 }\nuncertainty: { draws: 100, seed: 9 }\n');
    const forecast = await sereInProcess(['forecast', rel(join(folder, 'from-fit.yaml')), '--json']);
    expect(forecast.code).toBe(0);
    writeFileSync(join(folder, 'boot.yaml'), 'data: fit.json\nhorizon: { steps: 3 }\nuncertainty: { source: bootstrap, draws: 100, seed: 9 }\n');
    const boot = await sereInProcess(['forecast', rel(join(folder, 'boot.yaml')), '--debug']);
    expect([boot.code, boot.stderr.trim().split('\n').length]).toEqual([1, 1]);
    expect(boot.stderr).toContain('[NO_SITE_COUNTS]');
  });

  it('hindcast and fit --by refuse a raster stack in one line', async () => {
    const hindcast = await sereInProcess(['hindcast', stack, '--debug']);
    expect(hindcast.code).toBe(1);
    expect(hindcast.stderr).toContain('[NO_SITE_COUNTS]');
    const by = await sereInProcess(['fit', stack, '--by', 'zone', '--out', rel(join(folder, 'by.json')), '--debug']);
    expect(by.code).toBe(1);
    expect(by.stderr).toContain('[BAD_OPTION]');
  });

  it('a float raster: one line naming the file, exit 1, no stack trace, nothing written', async () => {
    const w = new StripTiffWriter(join(folder, 'ndvi.tif'), {
      width: 37, height: 29, kind: 'float32', rowsPerStrip: 29,
      geo: { pixelScale: [30, 30, 0], tiepoint: [0, 0, 0, 500000, 6000000, 0], geoKeys: projectedGeoKeys(32631) },
    });
    w.writeRows(new Float32Array(37 * 29).fill(0.3));
    w.finish();
    writeFileSync(join(folder, 'float.yaml'), 'rasters: { 2010: lc2010.tif, 2011: ndvi.tif }\n');
    const out = join(folder, 'float-fit.json');
    const run = await sereInProcess(['fit', rel(join(folder, 'float.yaml')), '--out', rel(out), '--debug']);
    expect(run.code).toBe(1);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toContain('[BAD_RASTER]');
    expect(run.stderr).toContain('ndvi.tif');
    expect(existsSync(out)).toBe(false);
  });

  it('a scenario fits one zone with fit.group', async () => {
    writeFileSync(join(folder, 'zone.yaml'), 'data: stack.yaml\nfit: { group: "20" }\nhorizon: { steps: 2 }\nuncertainty: { draws: 50, seed: 2 }\n');
    writeFileSync(join(folder, 'all.yaml'), 'data: stack.yaml\nhorizon: { steps: 2 }\nuncertainty: { draws: 50, seed: 2 }\n');
    const zone = JSON.parse((await sereInProcess(['forecast', rel(join(folder, 'zone.yaml')), '--json'])).stdout).scenarios[0];
    const all = JSON.parse((await sereInProcess(['forecast', rel(join(folder, 'all.yaml')), '--json'])).stdout).scenarios[0];
    expect(zone.data.transitions).toBeGreaterThan(0);
    expect(zone.data.transitions).toBeLessThan(all.data.transitions);
    writeFileSync(join(folder, 'nozone.yaml'), 'data: stack.yaml\nfit: { group: "25" }\nhorizon: { steps: 2 }\n');
    const bad = await sereInProcess(['forecast', rel(join(folder, 'nozone.yaml')), '--debug']);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain('[BAD_OPTION]');
  });

  it('sere check reads a stack: the order and period tests run on the counts', async () => {
    const run = await sereInProcess(['check', stack, '--seed', '4', '--draws', '100', '--replicates', '19', '--json']);
    expect(run.code).toBe(0);
    const json = JSON.parse(run.stdout) as { data: { sites: number; transitions: number }; tests: { order: { name: string; n: number; df: number }[] } };
    expect(json.data.sites).toBeGreaterThan(900);
    expect(json.data.transitions).toBeGreaterThan(2000);
    // Order 0 vs 1 on every one-step pair; order 1 vs 2 on the runs of three one step apart.
    const [zero, one] = json.tests.order;
    expect(zero!.n).toBe(json.data.transitions);
    expect(one!.n).toBeGreaterThan(0);
    expect(one!.n).toBeLessThan(zero!.n);
  });
});
