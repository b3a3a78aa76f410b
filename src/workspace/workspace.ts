import { existsSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import * as z from 'zod';
import { SereError } from '../errors.js';
import { readStructured } from '../data/read-structured.js';
import { fitSettingsSchema } from '../scenario/schema.js';
import { fitSettingsOf } from '../scenario/fit-block.js';
import type { FitSettings } from '../fit/settings.js';
import { MAX_SEED } from '../uncertainty/random.js';
import { clashingStems } from './record-names.js';

/** The file that makes a folder a sere workspace. */
export const WORKSPACE_FILE = 'sere-workspace.yaml';

/** A path in the workspace file: printable text (a NUL or control character is a typo, and breaks file calls). */
const pathText = z.string().min(1).regex(/^[^\u0000-\u001f\u007f]+$/, { error: 'a path cannot hold control characters' });

const workspaceSchema = z.strictObject({
  name: z.string().min(1).describe('The landscape or project; shown in every record.'),
  surveys: z.array(pathText).min(1, { error: 'list at least one survey table' })
    .describe('Survey tables (.csv), relative to the workspace; one per season is fine — they are read as one.'),
  fit: fitSettingsSchema.optional(),
  scenarios: z.array(pathText).min(1, { error: 'list at least one scenario file' })
    .describe('Scenario files run every season; a file listing alternatives is also compared.'),
  records: pathText.default('records').describe('Folder of the dated records; default records.'),
  seed: z.number().int().positive().max(MAX_SEED).optional()
    .describe('Seed for scenarios that name none; default: a fresh seed, kept in the record.'),
});

export interface Workspace {
  readonly root: string;
  readonly file: string;
  readonly name: string;
  /** Paths relative to the root. */
  readonly surveys: readonly string[];
  readonly scenarios: readonly string[];
  readonly records: string;
  readonly seed?: number;
  readonly fitSettings: FitSettings;
  /** The label map named by fit.labels, relative to the workspace folder: an input of every record. */
  readonly labels?: string;
  /** The error table (accuracy assessment) named by fit.errors, relative to the workspace folder: an input of every record. */
  readonly errors?: string;
}

/** Read `sere-workspace.yaml` in `root`, checking that every file it names exists inside the folder. */
export function loadWorkspace(root: string): Workspace {
  const file = join(root, WORKSPACE_FILE);
  if (!existsSync(file)) {
    throw new SereError('FILE_NOT_FOUND', `no ${WORKSPACE_FILE} in this folder`, { file: root },
      'name the workspace folder, or create one with sere init FOLDER');
  }
  const { value: w, locate } = readStructured(file, workspaceSchema, 'workspace file', 'BAD_WORKSPACE');
  const inside = (path: string, key: (string | number)[]): string => {
    const rel = relative(root, resolve(root, path));
    if (rel.startsWith('..')) {
      throw new SereError('BAD_WORKSPACE', `'${path}' is outside the workspace`, locate(key),
        'keep surveys, scenarios and records inside the workspace folder, so a record can copy them');
    }
    return rel.split('\\').join('/');
  };
  const fitSettings = fitSettingsOf(w.fit, locate, root);
  const scenarios = w.scenarios.map((s, n) => inside(s, ['scenarios', n]));
  const clash = clashingStems(scenarios);
  if (clash) {
    const [a, b] = clash;
    throw new SereError('BAD_WORKSPACE', `'${scenarios[b]}' would share its name in every record with '${scenarios[a]}'`,
      locate(['scenarios', b]), 'rename one of the two files (or list a file only once)');
  }
  return {
    root,
    file,
    name: w.name,
    surveys: w.surveys.map((s, n) => inside(s, ['surveys', n])),
    scenarios,
    records: inside(w.records, ['records']),
    seed: w.seed,
    fitSettings,
    ...(w.fit?.labels !== undefined ? { labels: inside(w.fit.labels, ['fit', 'labels']) } : {}),
    ...(w.fit?.errors !== undefined ? { errors: inside(w.fit.errors, ['fit', 'errors']) } : {}),
  };
}

/** The folder holding `sere-workspace.yaml`: the given one (default: the working folder). */
export function workspaceRoot(dir: string | undefined): string {
  return resolve(dir ?? '.');
}


/** The nearest folder at or above `dir` that holds `sere-workspace.yaml`, or undefined. */
export function workspaceAbove(dir: string): string | undefined {
  for (let at = resolve(dir); ; at = dirname(at)) {
    if (existsSync(join(at, WORKSPACE_FILE))) return at;
    if (dirname(at) === at) return undefined;
  }
}
