import { z } from 'zod';
import { SereError } from '../errors.js';
import { readStructured } from '../data/read-structured.js';
import { addSiteCells } from '../chain/counts.js';
import type { Fit } from './fit.js';

const count = z.number().int().nonnegative();
const label = z.string().min(1);

/** The keys of a fit file that sere reads back; estimates in the file are recomputed, not trusted. */
const fitFileSchema = z.object({
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
    skipped_pairs: z.array(z.object({ gap: z.number().int(), pairs: count })),
    repeated_rows: count,
    first_time: z.number().int(),
  }),
  latest: z.object({ time: z.number().int(), counts: z.array(count), sites: count.min(1) }),
  group_column: z.string().nullable().optional(),
  period_counts: z.array(z.object({ time: z.number().int(), cells: z.array(z.tuple([count, count, count])) })).nullable().optional(),
  order2_counts: z.array(z.tuple([count, count, count, count])).nullable().optional(),
  site_counts: z.array(z.object({
    site: z.string(),
    group: z.string().optional(),
    cells: z.array(z.tuple([count, count, count])),
  })),
});

/** Read a fit written by `sere fit --out`, checking that its counts are whole and consistent. */
export function loadFit(file: string): Fit {
  const { value: f, locate } = readStructured(file, fitFileSchema.loose(), 'fit file', 'BAD_FIT_FILE');
  const k = f.states.length;
  const bad = (what: string, path: (string | number)[]): never => {
    throw new SereError('BAD_FIT_FILE', what, locate(path), 'refit from the survey table with sere fit');
  };
  if (f.counts.length !== k) bad(`counts has ${f.counts.length} rows for ${k} states`, ['counts']);
  f.counts.forEach((row, i) => { if (row.length !== k) bad(`counts row ${i} has ${row.length} entries, expected ${k}`, ['counts', i]); });
  if (f.latest.counts.length !== k) bad(`latest.counts has ${f.latest.counts.length} entries for ${k} states`, ['latest', 'counts']);
  const counts = new Float64Array(f.counts.flat());
  const fromSites = new Float64Array(k * k);
  f.order2_counts?.forEach(([i, j, l], c) => { if (i >= k || j >= k || l >= k) bad('state index out of range', ['order2_counts', c]); });
  f.period_counts?.forEach((p, n) => p.cells.forEach(([i, j], c) => { if (i >= k || j >= k) bad('state index out of range', ['period_counts', n, 'cells', c]); }));
  f.site_counts.forEach((s, n) => {
    s.cells.forEach(([i, j], c) => { if (i >= k || j >= k) bad(`state index out of range`, ['site_counts', n, 'cells', c]); });
    addSiteCells(fromSites, k, s.cells);
  });
  if (fromSites.some((x, c) => x !== counts[c])) bad('site_counts do not add up to counts', ['site_counts']);
  const transitions = counts.reduce((a, b) => a + b, 0);
  const prior = f.prior.name === 'jeffreys' || f.prior.name === 'uniform' ? f.prior.name : f.prior.pseudo_count;
  return {
    input: f.input,
    states: f.states,
    step: f.step,
    prior,
    impossible: f.impossible,
    counts,
    sites: f.site_counts,
    transitions,
    skipped: f.data.skipped_pairs,
    repeatedRows: f.data.repeated_rows,
    surveys: f.data.surveys,
    firstTime: f.data.first_time,
    latest: { ...f.latest, shares: f.latest.counts.map((c) => c / f.latest.sites) },
    triples: f.order2_counts ?? undefined,
    periods: f.period_counts ?? undefined,
    groupColumn: f.group_column ?? undefined,
  };
}
