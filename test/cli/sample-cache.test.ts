import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-cli-cache-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * The built CLI with its sample cache (SERE_CACHE) gives the same bytes as without one, cold or
 * warm, on any number of threads: the demo's gap model and κ sampler, and its three pooled zones
 * (whose uncertainty split also takes the pooled point estimate from the cache).
 */
describe('sere forecast with the sample cache (built binary)', () => {
  // 2,100 draws are three blocks of draw-blocks.ts, so three threads each take one.
  const cases = [['scenarios/brenhollow/no-action.yaml', '1200', [], ['1']], ['scenarios/brenhollow/zoned.yaml', '2100', ['--zones'], ['1', '3']]] as const;
  for (const [file, draws, extra, threads] of cases) {
    it(`prints the same JSON without a cache, with a cold one and a warm one, on ${threads.join(' and ')} thread(s) (${file})`, () => {
      const cache = join(dir, file.replace(/\W/g, '-'));
      const args = ['forecast', file, '--json', '--draws', draws, ...extra];
      const none = sere(args, { SERE_CACHE: 'off' });
      expect(none.code).toBe(0);
      const cold = sere(args, { SERE_CACHE: cache });
      expect(cold.stdout).toBe(none.stdout);
      // The scenario's draws and the uncertainty split's point estimate.
      expect(readdirSync(cache).filter((f) => f.endsWith('.sample')).length).toBe(2);
      for (const t of threads) {
        const warm = sere([...args, '--threads', t], { SERE_CACHE: cache });
        expect(warm.stdout).toBe(none.stdout);
        expect(warm.stderr).toBe('');
      }
    }, 120_000);
  }
});

/** Every file under `root`, by relative path, with its bytes. */
function tree(root: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const entry of readdirSync(root, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const path = join(entry.parentPath, entry.name);
    out.set(path.slice(root.length), readFileSync(path, 'latin1'));
  }
  return out;
}

describe('sere season with the sample cache (built binary)', () => {
  it('writes the same record without a cache, with a cold one and a warm one (the zoned demo workspace)', () => {
    const fresh = join(dir, 'fresh');
    expect(sere(['init', fresh, '--zoned'], { SERE_CACHE: 'off' }).code).toBe(0);
    const cache = join(dir, 'season-cache');
    const records = ['off', cache, cache].map((setting, i) => {
      const ws = join(dir, `ws${i}`);
      cpSync(fresh, ws, { recursive: true });
      const r = sere(['season', ws], { SERE_CACHE: setting });
      expect(r.code).toBe(0);
      return tree(join(ws, 'records'));
    });
    // The season's fit-time sampler run, the scenario's draws, the split's point estimate.
    expect(readdirSync(cache).filter((f) => f.endsWith('.sample')).length).toBe(3);
    expect(records[0]!.size).toBeGreaterThan(5);
    expect(records[1]).toEqual(records[0]);
    expect(records[2]).toEqual(records[0]);
  }, 180_000);
});
