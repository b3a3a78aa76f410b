import { writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sereInProcess as sere } from './in-process.js';
import { smallStack, stackAsCsv, tempFolder } from '../data/raster/raster-fixtures.js';
import { LANDSCAPE_STATES } from '../../scripts/raster/landscape.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { zonePooling } from '../../src/fit/zones.js';

const temp = tempFolder('sere-raster-pooling-');
afterAll(() => temp.remove());
const STATES = LANDSCAPE_STATES.slice(0, 4).join(',');
const YEARS = [2010, 2011, 2012, 2014, 2015, 2016];

describe('--pooling on a raster stack with a zone raster', () => {
  it('partial pooling of the zone raster\'s zones equals the survey table of the same pixels with a zone column', async () => {
    const folder = join(temp.folder, 'zoned');
    const stack = relative(process.cwd(), smallStack(folder));
    const csv = join(folder, 'pixels.csv');
    await stackAsCsv(folder, YEARS, csv);
    const out = join(folder, 'fit.json');
    const r = await sere(['fit', stack, '--states', STATES, '--pooling', 'partial', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('partially pooled');
    const fromRaster = loadFit(out); // read back: the zones' counts add up to the pooled counts
    const table = JSON.parse((await sere(['fit', csv, '--states', STATES, '--group-column', 'zone', '--pooling', 'partial', '--json'])).stdout);
    const json = JSON.parse((await sere(['fit', stack, '--states', STATES, '--pooling', 'partial', '--json'])).stdout);
    expect(json.zones.pooling).toBe('partial');
    expect(json.zones.zones.map((z: { name: string }) => z.name)).toEqual(['10', '20', '30', '40']);
    expect(table.zones.zones.map((z: { name: string }) => z.name)).toEqual(['10', '20', '30', '40']);
    // The stack has a two-year gap (2012 → 2014): the zones' gapped pairs join the pooling (the same EM fits).
    expect(fromRaster.zones!.zones.every((z) => (z.fit.gapCounts?.length ?? 0) > 0)).toBe(true);
    expect(json.zones.shared).toEqual(table.zones.shared);
    json.zones.zones.forEach((z: Record<string, unknown>, n: number) => {
      const t = table.zones.zones[n];
      for (const key of ['transitions', 'probabilities', 'own_probabilities', 'pull', 'largest_change']) expect(z[key]).toEqual(t[key]);
    });
    // The fit read back gives the same point estimate as the one written.
    const p = zonePooling(fromRaster);
    json.zones.zones.forEach((z: { probabilities: number[][] }, n: number) => expect(z.probabilities.flat()).toEqual(Array.from(p.rows[n]!)));
  });

  it('a stratified forecast runs on it; a stack without a zone raster is refused at --pooling after counting, in one line', async () => {
    const folder = join(temp.folder, 'forecast');
    smallStack(folder);
    const file = join(folder, 'zoned.yaml');
    writeFileSync(file, `name: zoned\ndata: stack.yaml\nfit: { step: 1, states: [${STATES}], pooling: partial }\n` +
      'horizon: { steps: 4 }\nuncertainty: { draws: 200, seed: 3 }\nvariation: none\n');
    const f = await sere(['forecast', relative(process.cwd(), file), '--json']);
    expect(f.code).toBe(0);
    const zones = JSON.parse(f.stdout).scenarios[0].zones;
    expect(zones.pooling).toBe('partial');
    expect(zones.zones.map((z: { name: string }) => z.name)).toEqual(['10', '20', '30', '40']);
    // Without areas each zone weighs its share of the pixels of the latest map, and the shares add up to 1.
    expect(Math.abs(zones.zones.reduce((a: number, z: { share: number }) => a + z.share, 0) - 1)).toBeLessThan(1e-12);
    const bare = join(temp.folder, 'bare');
    const stack = relative(process.cwd(), smallStack(bare, { zones: false }));
    const r = await sere(['fit', stack, '--states', STATES, '--pooling', 'partial', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('BAD_ZONES');
    expect(r.stderr).toContain('--pooling');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });
});
