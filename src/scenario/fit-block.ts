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
 */
export function fitSettingsOf(block: z.infer<typeof fitSettingsSchema> | undefined, locate: (path: KeyPath) => Place): FitSettings {
  if (!block) return DEFAULT_FIT_SETTINGS;
  const impossiblePlace = locate(['fit', 'impossible']);
  return {
    places: { states: locate(['fit', 'states']), impossible: impossiblePlace },
    ...stepOf(block.step),
    prior: block.prior ?? DEFAULT_FIT_SETTINGS.prior,
    states: block.states,
    impossible: parseImpossible(block.impossible ?? [], impossiblePlace),
    columns: { ...DEFAULT_COLUMNS, ...block.columns },
    group: block.group,
  };
}

/** `step: 5` or `step: 1y` (dated surveys); the schema has checked the form. */
function stepOf(step: number | string | undefined): { step: number; dates?: boolean } {
  if (step === undefined) return { step: DEFAULT_FIT_SETTINGS.step };
  const parsed = parseStep(step)!;
  return parsed.dates ? parsed : { step: parsed.step };
}
