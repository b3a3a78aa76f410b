/**
 * Band widths of every replicate of a preposterior analysis, [replicate][state], and what
 * `sere effort` reports of them: their mean, and the Monte Carlo error of a cell's change from
 * "now". Replicate r of "now" and of every cell shares its random numbers (common random numbers;
 * Law & Kelton, ch. 11), so the change is estimated from the paired differences. How much that
 * pairing gains depends on the case: on the demo "now" and a cell correlate only 0.2–0.4 over seeds
 * (each replicate's truth and surveys weigh more than the shared band draws), so the error of the
 * change is then about that of the cell alone.
 */
export type ReplicateWidths = readonly (readonly number[])[];

/** Per state: the mean width over the replicates. */
export function meanWidths(runs: ReplicateWidths): number[] {
  const k = runs[0]?.length ?? 0;
  return Array.from({ length: k }, (_, s) => runs.reduce((a, r) => a + r[s]!, 0) / runs.length);
}

/**
 * Per state: the standard error of (mean cell width − mean "now" width), the sample standard
 * deviation of the R paired differences over √R; NaN with fewer than two replicates.
 */
export function changeError(cell: ReplicateWidths, now: ReplicateWidths): number[] {
  const R = cell.length;
  const k = cell[0]?.length ?? 0;
  return Array.from({ length: k }, (_, s) => {
    if (R < 2) return NaN;
    const d = cell.map((w, r) => w[s]! - now[r]![s]!);
    const mean = d.reduce((a, x) => a + x, 0) / R;
    const variance = d.reduce((a, x) => a + (x - mean) ** 2, 0) / (R - 1);
    return Math.sqrt(variance / R);
  });
}

/** Replicates 0 … n − 1 of `widths`. */
export function replicateWidths(n: number, widths: (r: number) => number[]): number[][] {
  return Array.from({ length: n }, (_, r) => widths(r));
}
