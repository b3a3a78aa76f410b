import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { multiply, matrix, type Matrix } from 'mathjs';
import { sereInProcess as sere } from '../cli/in-process.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { fitMle } from '../../src/fit/fit.js';

const tmp = (): string => mkdtempSync(join(tmpdir(), 'sere-zf-'));
const DEMO = 'scenarios/brenhollow/surveys.csv';
const FIT_FLAGS = ['--states', 'mudflat,pioneer,low-marsh,high-marsh,rank-grass', '--impossible', 'mudflat>high-marsh,rank-grass>mudflat', '--seed', '7'];

/** The forecast JSON without what names the files (and the zones block a stratified run adds). */
function comparable(stdout: string): unknown {
  const json = JSON.parse(stdout);
  for (const s of json.scenarios) { delete s.file; delete s.sha256; delete s.zones; delete s.name; delete s.data; }
  return json;
}

describe('stratified forecast', () => {
  it('with one zone equals the unzoned forecast, treatments, parcels, events and year-to-year variation included', async () => {
    const dir = tmp();
    // The demo with every site in one zone.
    const one = readFileSync(DEMO, 'utf8').replace(/,(north|south)$/gm, ',all');
    writeFileSync(join(dir, 'one.csv'), one);
    expect((await sere(['fit', join(dir, 'one.csv'), ...FIT_FLAGS, '--out', join(dir, 'plain.json')])).code).toBe(0);
    expect((await sere(['fit', join(dir, 'one.csv'), ...FIT_FLAGS, '--group-column', 'zone', '--pooling', 'none', '--out', join(dir, 'zoned.json')])).code).toBe(0);
    const body = (data: string): string => `data: ${data}
uncertainty: { source: posterior, draws: 600, seed: 11 }
horizon: { years: 12 }
target: { state: high-marsh, share: 0.35 }
treatments:
  - { name: graze, state: rank-grass, multiply: { high-marsh: 2 }, area: 0.4, parcel: east }
  - { name: sow, state: mudflat, move: { from: mudflat, to: pioneer, share: 0.3 }, years: [2027, 2030] }
events:
  - { name: surge, chance: 0.1, matrix: { high-marsh: { low-marsh: 0.5, high-marsh: 0.5 } } }
`;
    writeFileSync(join(dir, 'plain.yaml'), body('plain.json'));
    writeFileSync(join(dir, 'zoned.yaml'), body('zoned.json'));
    const plain = await sere(['forecast', join(dir, 'plain.yaml'), '--json']);
    const zoned = await sere(['forecast', join(dir, 'zoned.yaml'), '--json']);
    expect(plain.code).toBe(0);
    expect(zoned.code).toBe(0);
    expect(JSON.parse(plain.stdout).scenarios[0].variation).not.toBeNull();
    expect(JSON.stringify(comparable(zoned.stdout))).toBe(JSON.stringify(comparable(plain.stdout)));
  });

  it('combines zones by area: by hand on two zones, point estimates, no variation', async () => {
    const dir = tmp();
    expect((await sere(['fit', DEMO, ...FIT_FLAGS, '--group-column', 'zone', '--pooling', 'none', '--out', join(dir, 'z.json')])).code).toBe(0);
    writeFileSync(join(dir, 's.yaml'), `data: z.json
uncertainty: { source: point }
variation: none
horizon: { years: 6 }
show: [3, 6]
areas: { north: 1 km2, south: 3 km2 }
`);
    const r = await sere(['forecast', join(dir, 's.yaml'), '--json', '--zones']);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout).scenarios[0];
    const fit = loadFit(join(dir, 'z.json'));
    const k = 5;
    const rows = (p: Float64Array): number[][] => Array.from({ length: k }, (_, i) => Array.from(p.subarray(i * k, (i + 1) * k)));
    // x_z P_zᵗ by mathjs from each zone's own MLE and latest mix, then 1/4 and 3/4 of the area.
    const project = (z: number, t: number): number[] => {
      const zf = fit.zones!.zones[z]!.fit;
      let v: Matrix = matrix([Array.from(zf.latest.shares)]);
      for (let n = 0; n < t; n++) v = multiply(v, matrix(rows(fitMle(zf).p))) as Matrix;
      return (v.toArray() as number[][])[0]!;
    };
    for (const t of [1, 3, 6]) {
      const north = project(0, t);
      const south = project(1, t);
      fit.states.forEach((s, i) => {
        expect(out.shares[s].median[t]).toBeCloseTo(0.25 * north[i]! + 0.75 * south[i]!, 12);
        expect(out.zones.zones[0].shares[s].median[t]).toBeCloseTo(north[i]!, 12);
        expect(out.zones.zones[1].shares[s].median[t]).toBeCloseTo(south[i]!, 12);
      });
    }
    expect(out.zones.zones.map((z: { share: number }) => z.share)).toEqual([0.25, 0.75]);
    expect(out.zones.unit).toBe('km2');
  });

  it('a landscape event limited to one zone strikes only there: by hand, x ← x·P·E in that zone each year', async () => {
    const dir = tmp();
    expect((await sere(['fit', DEMO, ...FIT_FLAGS, '--group-column', 'zone', '--pooling', 'none', '--out', join(dir, 'z.json')])).code).toBe(0);
    writeFileSync(join(dir, 's.yaml'), `data: z.json
uncertainty: { source: point, draws: 1 }
variation: none
horizon: { years: 3 }
areas: { north: 0.4, south: 0.6 }
events:
  - { name: surge, chance: 1, zones: [south], matrix: { high-marsh: { low-marsh: 1 } } }
`);
    const r = await sere(['forecast', join(dir, 's.yaml'), '--json']);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout).scenarios[0];
    expect(out.events[0].zones).toEqual(['south']);
    const fit = loadFit(join(dir, 'z.json'));
    const k = 5;
    const E = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === 3 ? (j === 2 ? 1 : 0) : i === j ? 1 : 0)));
    const rows = (p: Float64Array): number[][] => Array.from({ length: k }, (_, i) => Array.from(p.subarray(i * k, (i + 1) * k)));
    const project = (z: number, t: number, hit: boolean): number[] => {
      const zf = fit.zones!.zones[z]!.fit;
      let v: Matrix = matrix([Array.from(zf.latest.shares)]);
      for (let n = 0; n < t; n++) {
        v = multiply(v, matrix(rows(fitMle(zf).p))) as Matrix;
        if (hit) v = multiply(v, matrix(E)) as Matrix;
      }
      return (v.toArray() as number[][])[0]!;
    };
    for (const t of [1, 2, 3]) {
      const north = project(0, t, false);
      const south = project(1, t, true);
      fit.states.forEach((s, i) => expect(out.shares[s].median[t]).toBeCloseTo(0.4 * north[i]! + 0.6 * south[i]!, 12));
    }
    // South holds no high-marsh after a surge; north keeps its own.
    expect(project(1, 1, true)[3]).toBe(0);
  });

  it('gives the same bytes on 1 and 2 threads (zones in the plan the workers receive)', async () => {
    const args = ['forecast', 'scenarios/brenhollow/zoned.yaml', '--draws', '2100', '--json', '--zones'];
    const one = await sere([...args, '--threads', '1']);
    const two = await sere([...args, '--threads', '2']);
    expect(one.code).toBe(0);
    expect(two.stdout).toBe(one.stdout);
    expect(JSON.parse(one.stdout).scenarios[0].zones.zones).toHaveLength(3);
  });
});
