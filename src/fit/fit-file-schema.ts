import * as z from 'zod';

// zod's int() admits only safe integers (|n| ≤ 2^53 − 1), so no count or time is silently rounded.
const count = z.number().int().nonnegative();
const time = z.number().int();
const label = z.string().min(1);
const cell = z.tuple([count, count, count]);

/**
 * The keys of a fit file that sere reads back, and their types. Estimates in the file are
 * recomputed, not trusted; the invariants between keys are checked in check-fit-file.ts.
 */
const fitBodySchema = z.object({
  format: z.literal('sere-fit', { error: "not a sere fit file (expected format: 'sere-fit')" }),
  format_version: z.literal(1, { error: 'this fit file format version is not supported; refit with this version of sere' }),
  input: z.object({ file: z.string(), sha256: z.string() }),
  states: z.array(label).min(2),
  step: z.number().int().positive(),
  prior: z.object({ name: z.string(), pseudo_count: z.number().positive() }),
  impossible: z.array(z.tuple([label, label])),
  counts: z.array(z.array(count)),
  data: z.object({
    surveys: count,
    sites: count.optional(),
    skipped_pairs: z.array(z.object({ gap: z.number().int().positive(), pairs: count })),
    gap_counts: z.array(z.tuple([count, count, count, count])).optional(),
    pairs_by_gap: z.array(z.object({ gap: z.number().int().positive(), pairs: count })).optional(),
    single_survey_sites: count.nullable().optional(),
    repeated_rows: count,
    first_time: time,
  }),
  latest: z.object({
    time, counts: z.array(count), sites: count.min(1),
    carried: z.array(z.object({ state: count, steps: count.min(1), sites: count.min(1) })).optional(),
    not_carried: count.optional(),
  }),
  group_column: z.string().min(1).nullable().optional(),
  period_counts: z.array(z.object({ time, cells: z.array(cell) })).nullable().optional(),
  order2_counts: z.array(z.tuple([count, count, count, count])).nullable().optional(),
  posterior_sampler: z.object({
    seed: z.number().int().positive(),
    chains: z.number().int().positive(),
    warm_up: count,
    thin: z.number().int().positive().optional(),
    retained: z.number().int().positive(),
    rhat: z.array(z.array(z.number().nullable())),
    ess: z.array(z.array(z.number().nullable())),
    latent_counts: z.array(z.array(count)),
    error_rhat: z.array(z.array(z.number().nullable())).optional(),
    error_ess: z.array(z.array(z.number().nullable())).optional(),
    error_matrices: z.array(z.array(z.number().min(0).max(1))).optional(),
    latest_true_counts: z.array(z.array(count)).optional(),
    observer_error_matrices: z.array(z.array(z.array(z.number().min(0).max(1)))).optional(),
    observer_error_rhat: z.array(z.array(z.array(z.number().nullable()))).optional(),
    observer_error_ess: z.array(z.array(z.array(z.number().nullable()))).optional(),
  }).loose().nullable().optional(),
  probabilities: z.array(z.array(z.number().min(0).max(1))).optional(),
  estimation: z.object({
    iterations: count, converged: z.boolean(), log_likelihood: z.number(), expected_counts: z.array(z.array(z.number().min(0))),
  }).loose().optional(),
  error_model: z.object({
    file: z.string(),
    sha256: z.string(),
    assessment: z.array(z.array(count)),
    dropped_rows: count,
    probabilities: z.array(z.array(z.number().min(0).max(1))),
    initial: z.array(z.number().min(0).max(1)),
    true_transitions: count,
    observers: z.array(z.object({
      name: label,
      assessment: z.array(z.array(count)),
      probabilities: z.array(z.array(z.number().min(0).max(1))),
    }).loose()).nullable().optional(),
    pooled_for: z.array(label).optional(),
    pooled_surveys: count.optional(),
    not_surveyed: z.array(label).optional(),
  }).loose().nullable().optional(),
  site_gap_counts: z.array(z.tuple([label, count, count, count, count])).optional(),
  site_positions: z.array(z.tuple([label, z.number(), z.number()])).nullable().optional(),
  spatial_blocks: z.object({
    side: z.number(),
    chosen_by: z.enum(['range', 'given']),
    range: z.object({ range: z.number().positive(), reached: z.boolean(), spacing: z.number().positive(), sites: count, edge_lag: z.number().nonnegative().optional() }).nullable().optional(),
    block_sites: z.array(count.min(1)).nullable().optional(),
  }).loose().nullable().optional(),
  site_counts: z.array(z.object({
    site: label,
    group: z.string().optional(),
    cells: z.array(cell),
  })).nullable(),
}).loose();

/** A zoned fit (zones.ts) adds its zones, each with its own fit in the same keys. */
export const fitFileSchema = fitBodySchema.extend({
  zones: z.object({
    column: z.string().min(1),
    pooling: z.enum(['partial', 'none'], { error: 'zones.pooling must be partial or none' }),
    zones: z.array(z.object({ name: z.string().min(1), fit: fitBodySchema }).loose()).min(1),
  }).loose().nullable().optional(),
});

export type FitFile = z.infer<typeof fitFileSchema>;
export type FitBody = z.infer<typeof fitBodySchema>;
