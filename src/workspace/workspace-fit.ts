import { join, relative } from 'node:path';
import { readSurveyTables } from '../data/read-survey-tables.js';
import type { SurveyTable } from '../data/survey.js';
import { fitSurvey, needsSampler, type Fit } from '../fit/fit.js';
import { DEFAULT_AUGMENT, sampleLatent } from '../uncertainty/augment.js';
import { randomStreams } from '../uncertainty/random.js';
import { cachedSample } from '../uncertainty/sample-cache.js';
import { groupOf, zonedPooling } from '../fit/fit-from-file.js';
import { surveyReadOptions } from '../fit/settings.js';
import { fitZoned } from '../fit/zones.js';
import type { Workspace } from './workspace.js';

/**
 * The workspace's fit from its current survey tables (read as one) and its `fit` block — what
 * `sere season` fits each season, and what `sere forecast`, `compare` and `effort` use for a scenario
 * of the workspace that names no data (cli/workspace-scenario.ts). The fit is unsampled: a chain
 * with gaps or an error table is sampled by whoever runs it.
 */
export function fitWorkspace(ws: Workspace): { readonly table: SurveyTable; readonly fit: Fit } {
  const settings = ws.fitSettings;
  const surveyPaths = ws.surveys.map((s) => relative(process.cwd(), join(ws.root, s)) || s);
  const pooling = zonedPooling(surveyPaths[0]!, settings);
  let table = readSurveyTables(surveyPaths, surveyReadOptions(settings));
  if (settings.group !== undefined) table = groupOf(table, settings.group, settings.columns.group);
  // With fit.pooling partial or none the record keeps each zone's fit (and counts) beside the pooled one.
  const fitted = pooling ? fitZoned(table, settings, pooling, settings.places?.pooling ?? { file: ws.file, path: 'fit.pooling' }) : fitSurvey(table, settings);
  // Paths as the workspace names them, so a record replayed from its own inputs/ writes the same fit.
  // The zones' own fits too: each names the same input.
  const asNamed = (f: Fit): Fit => ({ ...f, input: { file: ws.surveys.join(', '), sha256: f.input.sha256 },
    ...(f.labels && ws.labels !== undefined ? { labels: { ...f.labels, file: ws.labels } } : {}),
    ...(f.errorModel && ws.errors !== undefined ? { errorModel: { ...f.errorModel, file: ws.errors } } : {}) });
  const fit: Fit = { ...asNamed(fitted),
    ...(fitted.zones ? { zones: { ...fitted.zones, zones: fitted.zones.zones.map((z) => ({ ...z, fit: asNamed(z.fit) })) } } : {}) };
  return { table, fit };
}

/**
 * The workspace's fit with the posterior sampler's sweeps, when it needs them (pairs further apart
 * than one step, or an error table): one run on `seed` — the first scenario file's, so a replay
 * repeats it — serves a season's fit summary and every scenario, and the record's fit.json keeps the
 * sweeps, so a later season scores this record with the same posterior (score-records.ts). Kept
 * between runs by the sample cache when the same fit was sampled on the same seed before.
 */
export function sampledForSeason(fit: Fit, seed: number): Fit {
  if (!needsSampler(fit)) return fit;
  const sampler = randomStreams(seed).stream('fit-sampler');
  return { ...fit, latentSample: cachedSample({ sample: 'season-latent', fit, settings: DEFAULT_AUGMENT, seed: sampler.seed, stream: sampler.name },
    () => sampleLatent(fit, DEFAULT_AUGMENT, sampler)) };
}
