import type { MatrixDraws } from '../uncertainty/draws.js';
import type { RowVariationStatus } from '../uncertainty/variation.js';
import { bandOf, type Band } from './quantiles.js';

/** One row's year-to-year variation as a forecast reports it. */
export interface RowVariationSummary {
  readonly status: RowVariationStatus;
  /** κ: the posterior median and band (estimated), the given value (given), null when the row does not vary. */
  readonly kappa: Band | null;
  /** Periods with two or more transitions from the state. */
  readonly informativePeriods: number;
}

/** Per state, how its row varies from year to year; null when no row does (or variation is off). */
export function variationSummary(matrices: MatrixDraws, level: number): RowVariationSummary[] | null {
  const rows = matrices.variation;
  if (!rows || !matrices.concentration) return null;
  return rows.map((row) => {
    if (row.status === 'estimated') {
      const b = bandOf(row.kappa, level);
      return { status: row.status, kappa: { median: b.median, low: b.low, high: b.high }, informativePeriods: row.informativePeriods };
    }
    const given = matrices.concentration![row.state]!;
    const kappa = row.status === 'given' && given !== Infinity ? { median: given, low: given, high: given } : null;
    return { status: row.status, kappa, informativePeriods: row.informativePeriods };
  });
}
