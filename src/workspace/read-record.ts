import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { SereError } from '../errors.js';
import type { StoredFit, StoredForecast } from './changes.js';
import type { ScorableForecast } from './score-records.js';

export interface RecordManifest {
  readonly date: string;
  readonly previous: string | null;
  readonly scenarios: readonly { readonly file: string; readonly seed: number }[];
  /** Earlier records whose forecasts this one scored. */
  readonly scored: readonly string[];
  readonly contents: readonly string[];
}

export interface StoredRecord {
  readonly name: string;
  readonly dir: string;
  readonly manifest: RecordManifest;
  readonly fit: StoredFit;
  readonly forecasts: readonly (StoredForecast & ScorableForecast)[];
}

function readJson<T>(file: string): T {
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as T;
  } catch {
    throw new SereError('BAD_RECORD', 'is missing or not valid JSON', { file }, 'a record must hold the files sere wrote; do not edit records');
  }
}

/** Read back what a later season needs of a record: its manifest, fit and forecasts. */
export function readRecord(dir: string, name: string): StoredRecord {
  const manifest = readJson<RecordManifest>(join(dir, 'manifest.json'));
  const fit = readJson<StoredFit>(join(dir, 'fit.json'));
  const folder = join(dir, 'forecasts');
  const forecasts = existsSync(folder)
    ? readdirSync(folder).filter((f) => f.endsWith('.json')).sort()
      .flatMap((f) => readJson<{ scenarios: (StoredForecast & ScorableForecast)[] }>(join(folder, f)).scenarios)
    : [];
  return { name, dir, manifest, fit, forecasts };
}
