import { relative, resolve } from 'node:path';
import type { z } from 'zod';
import type { Place } from '../errors.js';
import type { KeyPath } from '../data/read-structured.js';
import { DEFAULT_COLUMNS } from '../data/survey.js';
import { DEFAULT_FIT_SETTINGS } from '../fit/fit-from-file.js';
import { parseImpossible, parseStep, type FitSettings } from '../fit/settings.js';
import type { fitSettingsSchema } from './schema.js';

/**
 * A `fit:` block (of a scenario or a workspace file) as fit settings, every default stated once;
 * the places of `states` and `impossible` go along so a later error names the key, not a flag.
 * `dir` is the folder of the file holding the block: a label map's path is relative to it.
 */
export function fitSettingsOf(block: z.infer<typeof fitSettingsSchema> | undefined, locate: (path: KeyPath) => Place, dir: string): FitSettings {
  if (!block) return DEFAULT_FIT_SETTINGS;
  const impossiblePlace = locate(['fit', 'impossible']);
  return {
    places: { states: locate(['fit', 'states']), impossible: impossiblePlace, sheet: locate(['fit', 'sheet']), labels: locate(['fit', 'labels']),
      columns: locate(['fit', 'columns']), errors: locate(['fit', 'errors']), pooling: locate(['fit', 'pooling']) },
    ...stepOf(block.step),
    ...(block.step === undefined ? { stepDefaulted: true } : {}),
    prior: block.prior ?? DEFAULT_FIT_SETTINGS.prior,
    states: block.states,
    impossible: parseImpossible(block.impossible ?? [], impossiblePlace),
    columns: { ...DEFAULT_COLUMNS, ...block.columns },
    group: block.group,
    ...(block.pooling !== undefined ? { pooling: block.pooling } : {}),
    ...(block.layout ? { layout: block.layout } : {}),
    ...(block.sheet !== undefined ? { sheet: block.sheet } : {}),
    // Relative to the file that names it; kept relative to the working folder, as data is.
    ...(block.labels !== undefined ? { labels: relative(process.cwd(), resolve(dir, block.labels)) } : {}),
    ...(block.errors !== undefined ? { errors: relative(process.cwd(), resolve(dir, block.errors)) } : {}),
  };
}

/** `step: 5` or `step: 1y` (dated surveys); the schema has checked the form. */
function stepOf(step: number | string | undefined): { step: number; dates?: boolean } {
  if (step === undefined) return { step: DEFAULT_FIT_SETTINGS.step };
  const parsed = parseStep(step)!;
  return parsed.dates ? parsed : { step: parsed.step };
}
