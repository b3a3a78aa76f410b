import type { PeriodCounts } from './counts.js';

/**
 * One from-state's transitions, survey period by survey period: what the year-to-year variation of
 * its row is estimated from (a Dirichlet–multinomial per period). Only periods with at least one
 * transition from the state are kept, and only the cells that are not structural zeros.
 */
export interface RowPeriods {
  readonly row: number;
  /** The to-states that can be reached (not declared impossible), in state order. */
  readonly cells: Int32Array;
  /** The start time of each kept period. */
  readonly times: readonly number[];
  /** `counts[t*m + c]`: transitions in period t to `cells[c]`, m = cells.length. */
  readonly counts: Float64Array;
  /** Per kept period: transitions from the state. */
  readonly totals: Float64Array;
}

/** The to-states row `row` can reach: those not declared impossible (`mask`), in state order. */
export function possibleCells(mask: Uint8Array, k: number, row: number): Int32Array {
  return Int32Array.from(Array.from({ length: k }, (_, j) => j).filter((j) => !mask[row * k + j]));
}

export function rowPeriods(periods: readonly PeriodCounts[], mask: Uint8Array, k: number, row: number): RowPeriods {
  const cells = possibleCells(mask, k, row);
  const column = new Int32Array(k).fill(-1);
  cells.forEach((j, c) => { column[j] = c; });
  const m = cells.length;
  const times: number[] = [];
  const rows: Float64Array[] = [];
  for (const period of periods) {
    const dense = new Float64Array(m);
    let total = 0;
    for (const [i, j, n] of period.cells) {
      if (i !== row || n === 0) continue;
      if (column[j]! < 0) throw new Error(`period ${period.time} has transitions ${i}>${j}, a structural zero`);
      dense[column[j]!] += n;
      total += n;
    }
    if (total > 0) { times.push(period.time); rows.push(dense); }
  }
  const counts = new Float64Array(rows.length * m);
  const totals = new Float64Array(rows.length);
  rows.forEach((r, t) => {
    counts.set(r, t * m);
    for (const n of r) totals[t] += n;
  });
  return { row, cells, times, counts, totals };
}

/** Periods with at least two transitions from the state: only they say anything about how years differ. */
export function informativePeriods(r: RowPeriods): number {
  let n = 0;
  for (const N of r.totals) if (N >= 2) n += 1;
  return n;
}
