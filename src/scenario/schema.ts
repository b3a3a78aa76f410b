import * as z from 'zod';
import { MAX_SEED } from '../uncertainty/random.js';

import { LIMITS } from '../limits.js';

const MAX_DRAWS = LIMITS.draws;

const positiveInt = (what: string) => z.number({ error: `${what} must be a number` })
  .int({ error: `${what} must be a whole number` }).positive({ error: `${what} must be positive` });

const stateName = z.string({ error: 'a state name is required' }).min(1, { error: 'a state name is required' });

/** How to fit a survey table named by `data` (the same settings as `sere fit`'s flags). */
export const fitSettingsSchema = z.strictObject({
  step: z.union([positiveInt('fit.step'), z.string().regex(/^\d+y$/, { error: 'fit.step must be a whole number, or years of dated surveys such as 1y' })],
    { error: 'fit.step must be a whole number, or years of dated surveys such as 1y' })
    .describe('Time units one step spans (5: surveys every 5 time units), or years of dated surveys (1y: the time column holds dates YYYY-MM-DD, each rounded to its yearly season).')
    .optional(),
  prior: z.union([z.enum(['jeffreys', 'uniform']), z.number().positive()],
    { error: 'prior must be jeffreys, uniform or a positive number' }).optional(),
  states: z.array(stateName).min(2, { error: 'list at least two states' }).optional(),
  impossible: z.array(z.string().regex(/^[^>]+>[^>]+$/, { error: 'write an impossible transition as from>to' })).optional(),
  columns: z.strictObject({
    site: z.string().min(1).optional(),
    time: z.string().min(1).optional(),
    state: z.string().min(1).optional(),
    group: z.string().min(1).optional(),
    observer: z.string().min(1).optional().describe('With errors: the column naming who made each survey, for one error matrix per observer named in the assessment. Default: a column named observer, if the table has one.'),
    x: z.string().min(1).optional().describe("The column holding each site's easting (projected units, e.g. metres); with y, the bootstrap resamples spatial blocks."),
    y: z.string().min(1).optional().describe("The column holding each site's northing (projected units)."),
  }).optional(),
  group: z.string().min(1).optional().describe("Fit only the sites of this group (the value in columns.group), e.g. a soil type's own fit."),
  pooling: z.enum(['complete', 'partial', 'none'], { error: 'pooling must be complete, partial or none' }).optional()
    .describe('How the zones of columns.group (or of a raster stack\'s zone raster) share a chain: complete (one pooled fit; the default), partial (each zone its own matrix, its rows shrunk toward shared rows), none (each zone its own fit). With partial or none the forecast is stratified by zone.'),
  layout: z.enum(['long', 'wide'], { error: 'layout must be long or wide' }).optional()
    .describe('long: one row per site and survey; wide: one row per site, one column per survey time. Default: detected from the header.'),
  sheet: z.string().min(1).optional().describe('The worksheet of a spreadsheet (.xlsx) to read. Default: the first.'),
  labels: z.string().min(1).optional()
    .describe('A label map (YAML, relative to this file): recorded label or class code → state, or skip. Every recorded label must be mapped or be one of its states.'),
  errors: z.string().min(1).optional()
    .describe('Observer error: an accuracy assessment (CSV with columns recorded,verified,n; relative to this file). The chain is then fitted to the true states behind the records.'),
});

const startSchema = z.union([
  z.literal('latest'),
  z.strictObject({
    year: z.number({ error: 'start.year must be a whole number' }).int({ error: 'start.year must be a whole number' }),
    shares: z.record(z.string(), z.number().min(0, { error: 'a share cannot be negative' }).max(1, { error: 'a share cannot exceed 1' })),
  }),
], { error: "start must be 'latest' or { year, shares }" });

const horizonSchema = z.union([
  z.strictObject({ years: positiveInt('horizon.years').max(LIMITS.horizonSteps * 100, { error: `horizon.years must be at most ${LIMITS.horizonSteps * 100}` }) }),
  z.strictObject({ steps: positiveInt('horizon.steps').max(LIMITS.horizonSteps, { error: `horizon.steps must be at most ${LIMITS.horizonSteps}` }) }),
], { error: 'horizon must be { years: N } or { steps: N }' });

/** A share or chance: a number from 0 to 1 (the messages say so, since "25%" is the usual slip). */
const probability = (what: string) => z.number({ error: `${what} must be a number from 0 to 1 (a share: 25% is 0.25)` })
  .min(0, { error: `${what} must be between 0 and 1` }).max(1, { error: `${what} must be between 0 and 1 (a share: 25% is 0.25)` });

/** A window of calendar years, first and last inclusive. */
const yearWindow = z.tuple([z.number().int(), z.number().int()], { error: 'years must be [first, last], two whole years' })
  .refine(([a, b]) => a <= b, { error: 'years must be [first, last] with first ≤ last' });

/**
 * A management treatment: changes the from-row of `state` by exactly one of multiply / set / move.
 * The untouched cells of the row are rescaled so the row sums to 1 (README, "Treatments").
 */
export const treatmentSchema = z.strictObject({
  name: z.string({ error: 'every treatment needs a name' }).min(1).describe('Shown in tables; treatments sharing a name in a comparison are the same treatment.'),
  state: stateName.describe('The from-state whose transitions the treatment changes (sites in this state).'),
  multiply: z.record(z.string(), z.number().nonnegative({ error: 'a factor cannot be negative' })).optional()
    .describe('Multiply the probability of going to each listed state by its factor; the rest of the row is rescaled.'),
  set: z.record(z.string(), probability('a set probability')).optional()
    .describe('Set the probability of going to each listed state; the rest of the row is rescaled.'),
  move: z.strictObject({ from: stateName, to: stateName, share: probability('move.share') }).optional()
    .describe('Move a share of the probability of going to `from` over to `to`; the row sum is unchanged.'),
  /** Default: every year of the forecast. */
  years: yearWindow.optional().describe('First and last calendar year it acts (inclusive); default: every year.'),
  /** Years to reach full effect, linearly; default 0 (full effect at once). */
  ramp: z.number().int().nonnegative({ error: 'ramp is a whole number of years, 0 or more' }).default(0)
    .describe('Years to reach full effect, linearly; default 0.'),
  /** Share of the whole area treated; default 1. */
  area: z.number().gt(0, { error: 'area must be above 0 (leave the treatment out instead)' }).max(1, { error: 'area must be at most 1' }).default(1)
    .describe('Share of the whole area treated, tracked as its own sub-population; default 1.'),
  /** Treatments naming the same parcel act on the same land; default: a parcel of its own. */
  parcel: z.string().min(1).optional().describe('Treatments naming the same parcel act on the same land; default: a parcel of its own.'),
  zones: z.array(z.string().min(1), { error: 'zones is a list of zone names, e.g. zones: [mineral]' }).min(1, { error: 'list at least one zone' }).optional()
    .describe('With a zoned fit: the zones it acts in (default all); its area is then a share of those zones.'),
}).refine((t) => [t.multiply, t.set, t.move].filter((x) => x !== undefined).length === 1,
  { error: 'a treatment needs exactly one of multiply, set or move' });

/** A disturbance: a transition matrix (rows not given leave those sites unchanged) striking by chance. */
export const eventSchema = z.strictObject({
  name: z.string({ error: 'every event needs a name' }).min(1),
  /** landscape: the whole area in the same year; site: each site independently. Default landscape. */
  scope: z.enum(['landscape', 'site'], { error: 'scope must be landscape or site' }).default('landscape')
    .describe('landscape: the whole area is hit in the same year; site: each site independently. Default landscape.'),
  chance: probability('chance').optional().describe('Chance per year.'),
  /** Return interval in years: a yearly chance of 1/every. */
  every: z.number().gt(0, { error: 'every is a return interval in years, above 0' }).optional()
    .describe('Return interval in years (a chance of 1/every per year).'),
  years: yearWindow.optional().describe('First and last calendar year it can strike; default: every year.'),
  matrix: z.record(z.string(), z.record(z.string(), probability('an event probability')))
    .describe('from-state → { to-state: probability }; rows not given are unaffected.'),
  zones: z.array(z.string().min(1), { error: 'zones is a list of zone names, e.g. zones: [mineral]' }).min(1, { error: 'list at least one zone' }).optional()
    .describe('With a zoned fit: the zones it acts in (default all); it strikes only there.'),
}).refine((e) => (e.chance === undefined) !== (e.every === undefined),
  { error: 'an event needs exactly one of chance (per year) or every (return interval in years)' });

export type TreatmentFile = z.infer<typeof treatmentSchema>;
export type EventFile = z.infer<typeof eventSchema>;

/** One management alternative in a file that lists several; the first is the baseline. */
const alternativeSchema = z.strictObject({
  name: z.string({ error: 'every alternative needs a name' }).min(1),
  description: z.string().optional(),
  treatments: z.array(treatmentSchema).default([]),
  events: z.array(eventSchema).default([]),
});

/**
 * A landscape target on the summed share of a set of states: `at_least` (reach a share) or
 * `at_most` (a cap, met while the share is at or below it). `{ state, share }` is the shorthand
 * for one state and `at_least`. Names, duplicates and stays_met against the step are checked
 * against the fit in load-scenario.ts (resolveTarget).
 */
const targetSchema = z.strictObject({
  state: stateName.optional().describe('Shorthand for states: [state].'),
  states: z.array(stateName, { error: 'target.states is a list, e.g. states: [heath, scrub]' })
    .min(1, { error: 'list at least one state in target.states' }).optional()
    .describe('The states whose shares are summed.'),
  share: probability('target.share').optional().describe('Shorthand for at_least.'),
  at_least: probability('target.at_least').optional().describe('Met while the summed share is at or above this.'),
  at_most: probability('target.at_most').optional().describe('Met while the summed share is at or below this (a cap).'),
  stays_met: positiveInt('target.stays_met').optional()
    .describe('Years: the target counts as reached in the first year from which it holds this many consecutive years within the horizon; default 1.'),
}).superRefine((t, ctx) => {
  // Point at the second key of a clashing pair, in file order (YAML keeps it), or at the target.
  const exactlyOne = (keys: readonly (keyof typeof t)[], message: string): void => {
    const given = Object.keys(t).filter((key) => (keys as readonly string[]).includes(key));
    if (given.length !== 1) ctx.addIssue({ code: 'custom', message, path: given.length > 1 ? [given[1]!] : [] });
  };
  exactlyOne(['state', 'states'], 'a target needs exactly one of state or states');
  exactlyOne(['share', 'at_least', 'at_most'], 'a target needs exactly one of at_least, at_most or share (the same as at_least)');
}).describe('A landscape target: the summed share of states reaching at_least, or kept at_most; { state, share } is shorthand for one state and at_least.');

const MAX_PLOTS = LIMITS.plots;
const plotCount = z.union([z.literal('latest'), positiveInt('plots').max(MAX_PLOTS, { error: `plots must be at most ${MAX_PLOTS}` })],
  { error: "plots must be a whole number or 'latest'" });

/**
 * The scenario file (YAML). Every option states its default here and in the README.
 * Unknown keys are errors (a typo must not silently fall back to a default).
 */
export const scenarioSchema = z.strictObject({
  /** Shown in every table; default: the file name. */
  name: z.string().min(1).optional(),
  description: z.string().optional(),
  /** A fit file from `sere fit --out` (.json), a survey table or counts table (.csv) fitted on the fly, or a raster stack (.yaml). Required. */
  data: z.string({ error: 'data must name a fit file (.json), a survey table or counts table (.csv), or a raster stack (.yaml)' }).min(1).optional()
    .describe('A fit file from sere fit --out (.json), a survey table or a counts table from sere count (.csv), or a raster stack file (.yaml: one classified GeoTIFF per year), relative to this file. Required, except in a workspace, whose surveys are used.'),
  fit: fitSettingsSchema.optional(),
  uncertainty: z.strictObject({
    /** Default posterior. */
    source: z.enum(['posterior', 'bootstrap', 'point'], { error: 'source must be posterior, bootstrap or point' }).default('posterior'),
    /** Default 4000. */
    draws: positiveInt('draws').max(MAX_DRAWS, { error: `draws must be at most ${MAX_DRAWS}` }).default(4000),
    /** Default: a fresh seed, printed. */
    seed: positiveInt('seed').max(MAX_SEED, { error: `seed must be at most ${MAX_SEED}` }).optional(),
    /** Default: the fit's (chosen from the range of spatial autocorrelation). */
    block_size: z.number({ error: 'block_size must be a number' }).positive({ error: 'block_size must be positive' }).optional()
      .describe("Side of the spatial bootstrap's square blocks, in the sites' projected units (pixels for a raster stack); needs positions (columns x and y) or a raster stack. Default: the range of spatial autocorrelation of the latest states."),
  }).default({ source: 'posterior', draws: 4000 }),
  /** Default: estimated when the record has at least three survey periods, else none. */
  variation: z.union([
    z.enum(['estimated', 'none']),
    z.strictObject({
      concentration: z.union([
        z.number().gt(0, { error: 'a concentration must be above 0' }),
        z.record(z.string(), z.number().gt(0, { error: 'a concentration must be above 0' })),
      ], { error: 'concentration is a number above 0, or a map from state to a number above 0' })
        .describe('κ: how alike the years are (a year\'s cell varies with variance p(1 − p)/(κ + 1)); one number for every state, or per state (states not listed do not vary).'),
    }),
  ], { error: "variation must be estimated, none or { concentration: … }" }).optional()
    .describe('Year-to-year variation of the transition probabilities: estimated from the spread between survey periods (default with at least three periods), none, or { concentration: κ }.'),
  /** Default latest: the mix of the latest survey. */
  start: startSchema.default('latest').describe("'latest' (the latest surveyed mix) or { year, shares }."),
  horizon: horizonSchema.describe('How far ahead: { years: N } or { steps: N }.'),
  /** Years after the start shown in the terminal table; default 5, 10, 20, 50 up to the horizon. */
  show: z.array(z.number().int().nonnegative({ error: 'show lists years after the start (0 or more)' })).optional()
    .describe('Years after the start shown in tables; default 5, 10, 20, 50 within the horizon.'),
  /** Credible level of every band; default 0.9. */
  level: z.number().gt(0, { error: 'level must be between 0 and 1' }).lt(1, { error: 'level must be between 0 and 1' }).default(0.9)
    .describe('Credible level of every band; default 0.9.'),
  target: targetSchema.optional(),
  /**
   * Also forecast how many of N plots are in each state: a number, or 'latest' (the sites of the
   * latest survey); or `{ count, as }` to say on which scale, `as: true` (the default: the true
   * states) or `as: recorded` (through the error matrix, as a survey would record them).
   */
  plots: z.union([plotCount, z.strictObject({
    count: plotCount,
    // YAML reads a bare `true` as a boolean: take it and the quoted word alike.
    as: z.union([z.literal('recorded'), z.literal('true'), z.literal(true)], { error: "as must be 'recorded' or 'true'" })
      .default('true').transform((v) => (v === 'recorded' ? 'recorded' as const : 'true' as const)),
    observer: z.string().min(1, { error: 'plots.observer names an observer of the accuracy assessment' }).optional(),
  })], { error: "plots must be a whole number, 'latest', or { count, as: true | recorded, observer }" }).optional()
    .describe("Plot counts: a whole number, 'latest', or { count, as: true | recorded, observer } — as: recorded draws them through the error matrix (default true: the true states); observer: through that assessed observer's own matrix (who will make the next survey)."),
  /** With a zoned fit: each zone's area (`410 ha`) or share (`0.6`); default each zone's share of the plots. */
  areas: z.record(z.string(), z.union([z.number(), z.string()], { error: 'an area is a share (0.6) or an area with its unit (410 ha)' })).optional()
    .describe('With a zoned fit (fit pooling partial or none): each zone\'s area with a unit (410 ha; units ha, km2, m2, acres — one unit for all) or its share of the whole (0.6, adding to 1). Default: each zone\'s share of the plots.'),
  /** Management, applied in every alternative. */
  treatments: z.array(treatmentSchema).default([]),
  /** Disturbances, applied in every alternative. */
  events: z.array(eventSchema).default([]),
  /** Alternatives to compare, the first being the baseline; each adds its own treatments and events. */
  alternatives: z.array(alternativeSchema).min(1, { error: 'list at least one alternative' }).optional(),
}, {
  // A list or a bare value at the top: say what a scenario file is, not "expected object".
  error: (issue) => (issue.code === 'invalid_type' ? 'a scenario file is a map of keys (name, data, horizon, …), not a list or a single value' : undefined),
});

export type ScenarioFile = z.infer<typeof scenarioSchema>;
