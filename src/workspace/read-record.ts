import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { SereError } from '../errors.js';
import { formatKeyPath } from '../data/read-structured.js';
import { LIMITS } from '../limits.js';
import type { StoredForecast } from './changes.js';
import type { ScorableForecast } from './score-records.js';
import { loadFit } from '../fit/load-fit.js';
import type { Fit } from '../fit/fit.js';

export interface RecordManifest {
  readonly date: string;
  readonly previous: string | null;
  readonly scenarios: readonly { readonly file: string; readonly seed: number }[];
  /** Earlier records whose forecasts this one scored. */
  readonly scored: readonly string[];
  /** The seed of the stream this record scored earlier records with (absent before scores format 2). */
  readonly scores_seed?: number | null;
  readonly contents: readonly string[];
}

export interface StoredRecord {
  readonly name: string;
  readonly dir: string;
  readonly manifest: RecordManifest;
  /** fit.json loaded as a fit file, every invariant checked: the chain a later season scores. */
  readonly chain: Fit;
  readonly forecasts: readonly (StoredForecast & ScorableForecast)[];
}

const numbers = z.array(z.number());
const band = z.object({ median: numbers, low: numbers, high: numbers, mean: numbers });
/** Keyed by state label: read into a null-prototype map so a state named `constructor` is just a state. */
const byState = <T extends z.ZodType>(value: T) => z.record(z.string(), value)
  .transform((r) => Object.assign(Object.create(null) as Record<string, z.infer<T>>, r));

/** What sere reads back of a record; anything else in its files is ignored. */
const manifestSchema = z.object({
  date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/),
  previous: z.string().nullable(),
  scenarios: z.array(z.object({ file: z.string().min(1), seed: z.number().int().min(1).max(LIMITS.seed) })),
  scored: z.array(z.string()).default([]),
  scores_seed: z.number().int().min(1).max(LIMITS.seed).nullish(),
  contents: z.array(z.string()),
});
const forecastFileSchema = z.object({
  scenarios: z.array(z.object({
    name: z.string(),
    years: z.array(z.number().int()),
    states: z.array(z.string()),
    start: z.object({ year: z.number().int(), from: z.string() }),
    treatments: z.array(z.unknown()),
    events: z.array(z.unknown()),
    shares: byState(band),
    plots: z.object({ total: z.number() }).catchall(z.unknown())
      .transform((p) => Object.assign(Object.create(null) as typeof p, p)).nullable(),
  })),
});

const HINT = 'a record must hold the files sere wrote; do not edit records (move a damaged one out of the records folder)';

function readJson<T>(file: string, schema: z.ZodType<T>): T {
  let value: unknown;
  try {
    value = JSON.parse(readFileSync(file, 'utf8'));
  } catch {
    throw new SereError('BAD_RECORD', 'is missing or not valid JSON', { file }, HINT);
  }
  const parsed = schema.safeParse(value);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    const path = formatKeyPath(issue.path.filter((p): p is string | number => typeof p !== 'symbol'));
    throw new SereError('BAD_RECORD', `is not as sere wrote it: ${issue.message}`, { file, path: path || undefined }, HINT);
  }
  return parsed.data;
}

/** Read back what a later season needs of a record: its manifest, fit and forecasts, each checked. */
export function readRecord(dir: string, name: string): StoredRecord {
  const manifest = readJson(join(dir, 'manifest.json'), manifestSchema);
  const chain = loadChain(join(dir, 'fit.json'));
  const folder = join(dir, 'forecasts');
  const forecasts = existsSync(folder)
    ? readdirSync(folder).filter((f) => f.endsWith('.json')).sort()
      .flatMap((f) => readJson(join(folder, f), forecastFileSchema).scenarios)
    : [];
  return { name, dir, manifest, chain, forecasts };
}

/** One owner for the invariants of a fit file (check-fit-file.ts); in a record, a broken one is a damaged record. */
function loadChain(file: string): Fit {
  try {
    return loadFit(file);
  } catch (err) {
    if (!(err instanceof SereError)) throw err;
    throw new SereError('BAD_RECORD', err.message, err.place, HINT);
  }
}
