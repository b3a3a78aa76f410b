import { describe, expect, it } from 'vitest';
import { eventHits } from '../../src/engine/event-hits.js';
import type { Disturbance } from '../../src/scenario/scenario.js';
import { MAX_SEED, randomStreams, streamKey } from '../../src/uncertainty/random.js';

describe('named random streams', () => {
  it('gives 10,000 consecutive seeds 10,000 distinct stream keys and distinct first draws', () => {
    // Regression: the earlier FNV derivation XORed the seed with its own first character, so seeds
    // 1…9 gave one and the same sub-stream (identical event years, plot noise, hindcast, effort).
    const keys = new Set<string>();
    const firsts = new Set<number>();
    for (let seed = 1; seed <= 10_000; seed++) {
      keys.add(Array.from(streamKey(seed, 'event:storm')).join(','));
      firsts.add(randomStreams(seed).stream('event:storm').uniform());
    }
    expect(keys.size).toBe(10_000);
    expect(firsts.size).toBe(10_000);
  });

  it('seeds 1…9 give different event streams and different plot streams', () => {
    const draws = (seed: number, name: string): string => {
      const stream = randomStreams(seed).stream(name);
      return Array.from({ length: 4 }, () => stream.uniform()).join(',');
    };
    for (const name of ['event:storm', 'plots', 'matrices']) {
      const outputs = new Set(Array.from({ length: 9 }, (_, i) => draws(i + 1, name)));
      expect(outputs.size).toBe(9);
    }
  });

  it('seeds 1…9 strike a landscape event in different years (the output the bug froze)', () => {
    const event: Disturbance = { name: 'storm', scope: 'landscape', chances: new Float64Array(31).fill(0.1), matrix: new Float64Array(0) };
    const years = new Set(Array.from({ length: 9 }, (_, i) =>
      Array.from(eventHits(randomStreams(i + 1).stream('event:storm'), event, 20, 30)).join('')));
    expect(years.size).toBe(9);
  });

  it('names a stream by its path: the same name gives the same stream however much the parent was used', () => {
    const a = randomStreams(7);
    const first = a.stream('plots').uniform();
    for (let n = 0; n < 1000; n++) a.uniform();
    expect(a.stream('plots').uniform()).toBe(first);
    expect(a.stream('plots').name).toBe('plots');
    expect(a.stream('x').stream('y').name).toBe('x/y');
    // A nested name differs from a flat one that looks alike only in the path, not by accident.
    expect(a.stream('x').stream('y').uniform()).not.toBe(a.stream('x:y').uniform());
    expect(a.stream('plots').uniform()).not.toBe(a.stream('events').uniform());
  });

  it('seeds xoshiro256** with the SHA-256 of seed and name, read as four little-endian 64-bit words', () => {
    // Python, exact integers: d = hashlib.sha256(b'sere-random:42:matrices').digest(); state =
    // [int.from_bytes(d[8*j:8*j+8], 'little') for j in range(4)]; the reference xoshiro256** step;
    // uniforms (x >> 11) * 2**-53 — draws 1, 2, 3 and 1000.
    const r = randomStreams(42).stream('matrices');
    const first = [r.uniform(), r.uniform(), r.uniform()];
    for (let n = 4; n < 1000; n++) r.uniform();
    expect([...first, r.uniform()]).toEqual([0.9622289855830991, 0.3345975939786652, 0.16375854348094065, 0.12519820664712578]);
  });

  it('keeps the seed for reports and refuses seeds outside 1 … 2³² − 1', () => {
    expect(randomStreams(5).stream('a').stream('b').seed).toBe(5);
    for (const bad of [0, -1, 1.5, MAX_SEED + 1, Number.NaN]) expect(() => randomStreams(bad)).toThrow(RangeError);
    expect(() => randomStreams(MAX_SEED)).not.toThrow();
  });

  it('draws uniforms on [0, 1) with mean ½ and variance 1/12 (within 5 standard errors)', () => {
    const r = randomStreams(2026).stream('check');
    const n = 100_000;
    let sum = 0;
    let sq = 0;
    for (let i = 0; i < n; i++) {
      const u = r.uniform();
      expect(u >= 0 && u < 1).toBe(true);
      sum += u;
      sq += u * u;
    }
    const mean = sum / n;
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n));
    expect(Math.abs(sq / n - mean * mean - 1 / 12)).toBeLessThan(5 * Math.sqrt(1 / 180 / n));
  });
});
