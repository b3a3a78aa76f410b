import { chiSquareUpperTail } from '../chain/chi-square.js';
import { stratifiedIndependence } from '../chain/contingency.js';
import { homogeneity } from '../chain/markov-tests.js';

type Cells = readonly (readonly [number, number, number])[];

export interface PeriodContribution {
  readonly label: string;
  /** This period's part of the homogeneity test's G²: Σ over from-states and to-states of 2·n·ln(n/E). */
  readonly g2: number;
}

export interface PeriodStandout {
  /** Every period's part of G², largest first. */
  readonly ranked: readonly PeriodContribution[];
  /** The homogeneity test again without the period that differs most (null with fewer than three periods). */
  readonly withoutTop: { readonly g2: number; readonly df: number; readonly p: number } | null;
}

/**
 * Which survey period stands out. The homogeneity test's G² (Anderson & Goodman 1957) is a sum
 * over cells of 2·n·ln(n/E), E the count expected if every period shared each from-state's
 * pooled row; summing a period's cells gives its contribution (G² partitioned by rows of the
 * table, as in Bishop, Fienberg & Holland 1975, ch. 7). The test is then rerun without the
 * largest contributor: if the others agree, one period (a fire, a wet year) made the difference.
 */
export function periodStandout(periods: readonly { readonly label: string; readonly cells: Cells }[], k: number): PeriodStandout {
  const tables = homogeneity(periods.map((p) => p.cells), k);
  const S = periods.length;
  const g2 = new Float64Array(S);
  for (const table of tables) {
    const rowTotal = new Float64Array(S);
    const colTotal = new Float64Array(k);
    let n = 0;
    for (let s = 0; s < S; s++) for (let j = 0; j < k; j++) {
      const x = table.counts[s * k + j]!;
      rowTotal[s] += x; colTotal[j] += x; n += x;
    }
    if (n === 0) continue;
    for (let s = 0; s < S; s++) for (let j = 0; j < k; j++) {
      const x = table.counts[s * k + j]!;
      if (x > 0) g2[s] += 2 * x * Math.log(x / ((rowTotal[s]! * colTotal[j]!) / n));
    }
  }
  const ranked = periods.map((p, s) => ({ label: p.label, g2: g2[s]! })).sort((a, b) => b.g2 - a.g2);
  if (S < 3) return { ranked, withoutTop: null };
  const top = periods.findIndex((p) => p.label === ranked[0]!.label);
  const rest = periods.filter((_, s) => s !== top).map((p) => p.cells);
  const stat = stratifiedIndependence(homogeneity(rest, k));
  return { ranked, withoutTop: { g2: stat.g2, df: stat.df, p: chiSquareUpperTail(stat.g2, stat.df) } };
}
