import { homedir } from 'node:os';
import { join, resolve } from 'node:path';
import type { SampleCacheSettings } from '../uncertainty/sample-cache.js';

/** The hash of the sources and lock file, written into the bundle by scripts/bundle.mjs (absent when running from the sources). */
declare const SERE_CODE_ID: string | undefined;

/**
 * Where the executable keeps its sample cache (uncertainty/sample-cache.ts): `SERE_CACHE` names the
 * folder, or is `off`; unset, `$XDG_CACHE_HOME/sere`, else `~/.cache/sere`. Without a code hash
 * (the sources run directly, as under the tests) there is no cache: a file could not say which
 * code made it.
 */
export function cacheSettingsFrom(env: NodeJS.ProcessEnv, warn: (line: string) => void): SampleCacheSettings | undefined {
  const codeId = typeof SERE_CODE_ID === 'string' ? SERE_CODE_ID : undefined;
  const asked = env['SERE_CACHE'];
  if (codeId === undefined || asked === 'off') return undefined;
  const base = env['XDG_CACHE_HOME'] || join(homedir(), '.cache');
  return { dir: asked ? resolve(asked) : join(base, 'sere'), codeId, warn };
}
