import { mkdirSync, readdirSync, readFileSync, renameSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { digestOf, NotData } from './value-digest.js';
import { packValue, unpackValue } from './packed-value.js';

/**
 * What the samplers produced, kept on disk between runs, so a forecast or a season does not redo
 * fit-time work (the gap model's data augmentation, the κ sampler, partial pooling of zones, the
 * point estimate's EM) that an earlier run with the same inputs already did. It sits where a
 * sampler's output is handed on — a scenario's matrix draws (engine/scenario-draws.ts), the
 * uncertainty split's point draws, the gap sampler's retained sweeps at fit time — never inside a
 * sampler. A file holds exactly what was computed, keyed by a SHA-256 of everything it is a
 * function of: the inputs the caller names (the fit, every field as data; the source, the number of
 * draws, year-to-year variation, sampler settings, the random stream's seed and name), the code
 * that made it (SERE_CODE_ID, the hash of the sources and lock file written into the bundle) and
 * the Node version — so a run gives the same bytes with or without it. A file whose checksum,
 * length or key does not match is never used: a one-line warning, then the value is computed again
 * and the file rewritten. The cache is set up once, by the executable (bin/sere.ts, from
 * SERE_CACHE); runs through `run()` alone (tests, the library) have none unless configured.
 */
export interface SampleCacheSettings {
  /** The folder of cache files (made when first written). */
  readonly dir: string;
  /** What code made the values: a hash of the sources and lock file. */
  readonly codeId: string;
  /** Where a damaged file is reported (one line, no newline). */
  readonly warn: (line: string) => void;
}

/** Bumped when the file layout changes. */
export const CACHE_FORMAT = 1;
/** A value larger than this is not written (10⁵ matrix draws × 10 states are 80 MB). */
export const MAX_ENTRY_BYTES = 128 * 2 ** 20;
/** Files kept in the folder at most; the oldest go first. */
export const MAX_ENTRIES = 64;
/** Bytes kept in the folder at most; the oldest files go first. */
export const MAX_TOTAL_BYTES = 2 ** 30;
const SUFFIX = '.sample';

let settings: SampleCacheSettings | undefined;

/** Turn the cache on (settings) or off (undefined) for this process. */
export function configureSampleCache(next: SampleCacheSettings | undefined): void {
  settings = next;
}

/**
 * What `compute` makes from `inputs`, read from the cache when a file for exactly these inputs
 * exists and is intact, else computed and written. `inputs` must hold everything the value depends
 * on besides the code; a tree that is not plain data is computed without a cache. The value must be
 * plain data too (packed-value.ts); its Float64Arrays come back in shared memory.
 */
export function cachedSample<T>(inputs: unknown, compute: () => T): T {
  const s = settings;
  if (!s) return compute();
  let key: string;
  try {
    key = digestOf({ format: CACHE_FORMAT, code: s.codeId, node: process.version, inputs });
  } catch (err) {
    if (err instanceof NotData) return compute();
    throw err;
  }
  const file = join(s.dir, `${key}${SUFFIX}`);
  const found = readEntry(file, key);
  if (found.value !== undefined) return found.value as T;
  if (found.damage) s.warn(`sere: warning: cache file ${file} is damaged (${found.damage}); ignored, computed again and rewritten`);
  const value = compute();
  writeEntry(s.dir, file, key, value);
  return value;
}

interface Found { value?: unknown; damage?: string }

/** Header line: JSON {format, key, bytes, sha256} and a newline, then the packed value. */
function readEntry(file: string, key: string): Found {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch {
    return {};
  }
  const newline = bytes.indexOf(10);
  if (newline < 0) return { damage: 'no header' };
  let header: { format?: unknown; key?: unknown; bytes?: unknown; sha256?: unknown };
  try {
    header = JSON.parse(bytes.toString('utf8', 0, newline)) as typeof header;
  } catch {
    return { damage: 'unreadable header' };
  }
  if (header.format !== CACHE_FORMAT) return { damage: `format ${String(header.format)}, not ${CACHE_FORMAT}` };
  if (header.key !== key) return { damage: 'key does not match its name' };
  const payload = bytes.subarray(newline + 1);
  if (header.bytes !== payload.length) return { damage: `${payload.length} bytes, not ${String(header.bytes)}` };
  if (header.sha256 !== createHash('sha256').update(payload).digest('hex')) return { damage: 'checksum mismatch' };
  try {
    return { value: unpackValue(payload) };
  } catch {
    return { damage: 'unreadable value' };
  }
}

/** Written to a temporary name and renamed, so a reader never sees half a file; failures only cost the cache. */
function writeEntry(dir: string, file: string, key: string, value: unknown): void {
  let payload: Buffer | undefined;
  try {
    payload = packValue(value, MAX_ENTRY_BYTES);
  } catch (err) {
    if (err instanceof NotData) return;
    throw err;
  }
  if (!payload) return;
  const header = Buffer.from(`${JSON.stringify({ format: CACHE_FORMAT, key, bytes: payload.length,
    sha256: createHash('sha256').update(payload).digest('hex') })}\n`, 'utf8');
  const temporary = `${file}.${process.pid}.tmp`;
  try {
    mkdirSync(dir, { recursive: true });
    writeFileSync(temporary, Buffer.concat([header, payload]));
    renameSync(temporary, file);
    prune(dir);
  } catch {
    try { unlinkSync(temporary); } catch { /* never written */ }
  }
}

/** Keep the folder within MAX_ENTRIES files and MAX_TOTAL_BYTES, removing the oldest first. */
function prune(dir: string): void {
  const entries = readdirSync(dir).filter((name) => name.endsWith(SUFFIX)).map((name) => {
    const stat = statSync(join(dir, name));
    return { name, bytes: stat.size, time: stat.mtimeMs };
  }).sort((a, b) => b.time - a.time);
  let total = 0;
  entries.forEach((entry, i) => {
    total += entry.bytes;
    if (i >= MAX_ENTRIES || total > MAX_TOTAL_BYTES) unlinkSync(join(dir, entry.name));
  });
}
