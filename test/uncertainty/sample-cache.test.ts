import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { loadScenarios } from '../../src/scenario/load-scenario.js';
import { scenarioDraws } from '../../src/engine/scenario-draws.js';
import { cachedSample, configureSampleCache } from '../../src/uncertainty/sample-cache.js';
import { digestOf } from '../../src/uncertainty/value-digest.js';
import { packValue, unpackValue } from '../../src/uncertainty/packed-value.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';

/** Everything a set of draws holds, as bytes: two sets are the same when these are. */
const bytesOf = (draws: MatrixDraws): Buffer => packValue(draws)!;

let dir = '';
let warnings: string[] = [];
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'sere-cache-'));
  warnings = [];
  configureSampleCache({ dir, codeId: 'test', warn: (line) => { warnings.push(line); } });
});
afterEach(() => {
  configureSampleCache(undefined);
  rmSync(dir, { recursive: true, force: true });
});

const files = (): string[] => readdirSync(dir).filter((f) => f.endsWith('.sample'));

/** The demo's scenarios: gaps (data augmentation) and κ sampling; three zones with partial pooling. */
const cases = [
  ['scenarios/brenhollow/no-action.yaml', 20261201],
  ['scenarios/brenhollow/zoned.yaml', 20261202],
] as const;

describe('the sample cache', () => {
  for (const [file, seed] of cases) {
    it(`gives the same bytes with no cache, a cold cache and a warm one (${file})`, () => {
      const [scenario] = loadScenarios(file);
      const draws = () => scenarioDraws(scenario!, 1500, randomStreams(seed).stream('matrices'));
      configureSampleCache(undefined);
      const none = bytesOf(draws());
      configureSampleCache({ dir, codeId: 'test', warn: (line) => { warnings.push(line); } });
      const cold = bytesOf(draws());
      expect(files()).toHaveLength(1);
      const warm = draws();
      expect(bytesOf(warm).equals(none)).toBe(true);
      expect(cold.equals(none)).toBe(true);
      // The engine's threads need the draws in shared memory, read back or not.
      expect(warm.data.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(warnings).toEqual([]);
    });
  }

  it('keys by every input: another seed, draw count, stream or code is another file', () => {
    const [scenario] = loadScenarios('scenarios/brenhollow/no-action.yaml', { variation: 'none' });
    scenarioDraws(scenario!, 100, randomStreams(1).stream('matrices'));
    scenarioDraws(scenario!, 100, randomStreams(2).stream('matrices'));
    scenarioDraws(scenario!, 101, randomStreams(1).stream('matrices'));
    scenarioDraws(scenario!, 100, randomStreams(1).stream('other'));
    scenarioDraws({ ...scenario!, source: 'point' }, 100, randomStreams(1).stream('matrices'));
    expect(files()).toHaveLength(5);
    configureSampleCache({ dir, codeId: 'other code', warn: (line) => { warnings.push(line); } });
    scenarioDraws(scenario!, 100, randomStreams(1).stream('matrices'));
    expect(files()).toHaveLength(6);
    scenarioDraws(scenario!, 100, randomStreams(1).stream('matrices'));
    expect(files()).toHaveLength(6);
  });

  it('never uses a damaged file: one warning, the draws made again, the file rewritten', () => {
    const [scenario] = loadScenarios('scenarios/brenhollow/no-action.yaml', { variation: 'none' });
    const draws = () => scenarioDraws(scenario!, 300, randomStreams(7).stream('matrices'));
    const fresh = bytesOf(draws());
    const [name] = files();
    const path = join(dir, name!);
    const good = readFileSync(path);
    const damage = (bytes: Buffer): void => {
      writeFileSync(path, bytes);
      expect(bytesOf(draws()).equals(fresh)).toBe(true);
      expect(warnings).toHaveLength(1);
      expect(warnings[0]).toContain(path);
      expect(readFileSync(path).equals(good)).toBe(true);
      warnings = [];
    };
    // One draw's bit flipped (the checksum), the file cut short (the length), the header broken,
    // and a valid file of other draws under this key's name (the key inside).
    const flipped = Buffer.from(good);
    flipped[flipped.length - 3] ^= 1;
    damage(flipped);
    damage(good.subarray(0, good.length - 8));
    damage(Buffer.concat([Buffer.from('{"format":1,'), good.subarray(good.indexOf(10))]));
    scenarioDraws(scenario!, 300, randomStreams(8).stream('matrices'));
    const other = files().find((f) => f !== name)!;
    damage(readFileSync(join(dir, other)));
    expect(statSync(path).size).toBe(good.length);
  });

  it('computes without a cache when an input is not data (a function)', () => {
    let made = 0;
    const compute = (): MatrixDraws => { made++; return { k: 1, count: 1, data: new Float64Array([1]), source: 'point', notes: [] }; };
    cachedSample({ f: () => 1 }, compute);
    cachedSample({ f: () => 1 }, compute);
    expect(made).toBe(2);
    expect(files()).toEqual([]);
    cachedSample({ f: 1 }, compute);
    cachedSample({ f: 1 }, compute);
    expect(made).toBe(3);
    expect(files()).toHaveLength(1);
  });

  it('reads a warm entry instead of computing', () => {
    const one = (value: number) => (): MatrixDraws => ({ k: 1, count: 1, data: new Float64Array([value]), source: 'point', notes: [] });
    expect(cachedSample({ x: 1 }, one(0.25)).data[0]).toBe(0.25);
    expect(cachedSample({ x: 1 }, one(0.5)).data[0]).toBe(0.25);
    expect(cachedSample({ x: 2 }, one(0.5)).data[0]).toBe(0.5);
  });
});

describe('value digest and packing', () => {
  it('tells apart trees that JSON would confuse, and ignores key order and undefined members', () => {
    expect(digestOf({ a: 1, b: [2] })).toBe(digestOf({ b: [2], a: 1, c: undefined }));
    const distinct = [0, -0, NaN, Infinity, '0', [0], [[0]], { a: 0 }, new Float64Array([0]), new Float32Array([0, 0]),
      new Uint8Array(8), [], {}, null, undefined, true, new Map([[0, 0]]), new Set([0])];
    expect(new Set(distinct.map(digestOf)).size).toBe(distinct.length);
    expect(digestOf(new Float64Array([1, 2]).subarray(1))).toBe(digestOf(new Float64Array([2])));
  });

  it('packs and unpacks a tree bit for bit', () => {
    const tree = { k: 2, list: [1.5, -0, NaN, -Infinity, 'x', null, true], nested: { f: new Float64Array([0.1, Infinity, NaN]),
      i: new Int32Array([-3, 7]), u: new Uint8Array([1, 2, 3]) }, empty: new Float64Array(0) };
    const back = unpackValue(packValue(tree)!) as typeof tree;
    expect(digestOf(back)).toBe(digestOf(tree));
    expect(Object.is(back.list[1], -0)).toBe(true);
    expect(back.nested.f.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(packValue(back)!.equals(packValue(tree)!)).toBe(true);
  });

  it('does not pack a value past its size limit (nothing copied for a cache entry too large to keep)', () => {
    const tree = { f: new Float64Array(1000) };
    const size = packValue(tree)!.length;
    expect(packValue(tree, size)!.length).toBe(size);
    expect(packValue(tree, size - 1)).toBeUndefined();
  });
});
