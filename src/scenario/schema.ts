import { z } from 'zod';
import { MAX_SEED } from '../uncertainty/random.js';

/** Most draws a scenario may ask for: 1e6 draws × 100 steps × 10 states is already 8 GB of shares. */
export const MAX_DRAWS = 1_000_000;

const positiveInt = (what: string) => z.number({ error: `${what} must be a number` })
  .int({ error: `${what} must be a whole number` }).positive({ error: `${what} must be positive` });

const stateName = z.string({ error: 'a state name is required' }).min(1, { error: 'a state name is required' });

/** How to fit a survey table named by `data` (the same settings as `sere fit`'s flags). */
const fitSettingsSchema = z.strictObject({
  step: positiveInt('fit.step').optional(),
  prior: z.union([z.enum(['jeffreys', 'uniform']), z.number().positive()],
    { error: 'prior must be jeffreys, uniform or a positive number' }).optional(),
  states: z.array(stateName).min(2, { error: 'list at least two states' }).optional(),
  impossible: z.array(z.string().regex(/^[^>]+>[^>]+$/, { error: 'write an impossible transition as from>to' })).optional(),
  columns: z.strictObject({
    site: z.string().min(1).optional(),
    time: z.string().min(1).optional(),
    state: z.string().min(1).optional(),
  }).optional(),
});

const startSchema = z.union([
  z.literal('latest'),
  z.strictObject({
    year: z.number({ error: 'start.year must be a whole number' }).int({ error: 'start.year must be a whole number' }),
    shares: z.record(z.string(), z.number().min(0, { error: 'a share cannot be negative' }).max(1, { error: 'a share cannot exceed 1' })),
  }),
], { error: "start must be 'latest' or { year, shares }" });

const horizonSchema = z.union([
  z.strictObject({ years: positiveInt('horizon.years') }),
  z.strictObject({ steps: positiveInt('horizon.steps') }),
], { error: 'horizon must be { years: N } or { steps: N }' });

/**
 * The scenario file (YAML). Every option states its default here and in the README.
 * Unknown keys are errors (a typo must not silently fall back to a default).
 */
export const scenarioSchema = z.strictObject({
  /** Shown in every table; default: the file name. */
  name: z.string().min(1).optional(),
  description: z.string().optional(),
  /** A fit file from `sere fit --out` (.json) or a survey table (.csv) fitted on the fly. Required. */
  data: z.string({ error: 'data is required: name a fit file (.json) or survey table (.csv)' }).min(1),
  fit: fitSettingsSchema.optional(),
  uncertainty: z.strictObject({
    /** Default posterior. */
    source: z.enum(['posterior', 'bootstrap', 'point'], { error: 'source must be posterior, bootstrap or point' }).default('posterior'),
    /** Default 4000. */
    draws: positiveInt('draws').max(MAX_DRAWS, { error: `draws must be at most ${MAX_DRAWS}` }).default(4000),
    /** Default: a fresh seed, printed. */
    seed: positiveInt('seed').max(MAX_SEED, { error: `seed must be at most ${MAX_SEED}` }).optional(),
  }).default({ source: 'posterior', draws: 4000 }),
  /** Default latest: the mix of the latest survey. */
  start: startSchema.default('latest'),
  horizon: horizonSchema,
  /** Years after the start shown in the terminal table; default 5, 10, 20, 50 up to the horizon. */
  show: z.array(z.number().int().nonnegative({ error: 'show lists years after the start (0 or more)' })).optional(),
  /** Credible level of every band; default 0.9. */
  level: z.number().gt(0, { error: 'level must be between 0 and 1' }).lt(1, { error: 'level must be between 0 and 1' }).default(0.9),
  target: z.strictObject({
    state: stateName,
    share: z.number().gt(0, { error: 'target.share must be above 0' }).max(1, { error: 'target.share must be at most 1' }),
  }).optional(),
});

export type ScenarioFile = z.infer<typeof scenarioSchema>;
