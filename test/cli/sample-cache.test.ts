import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const dir = mkdtempSync(join(tmpdir(), 'sere-cli-cache-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * The built CLI with its draws cache (SERE_CACHE) gives the same bytes as without one, cold or
 * warm, on any number of threads: the demo's gap model and κ sampler, and its three pooled zones
 * (whose uncertainty split also takes the pooled point estimate from the cache).
 */
describe('sere forecast with the draws cache (built binary)', () => {
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
