import { stratifiedIndependence, type Table } from '../chain/contingency.js';
import { multinomialSampler } from './multinomial.js';
import type { RandomStream } from './random.js';

/**
 * A parametric-bootstrap p-value for a stratified independence test, for tables too sparse for
 * the chi-square approximation: tables are simulated under the null hypothesis — each row keeps its
 * total and is redrawn from its stratum's pooled column proportions (for the order test, that is the
 * first-order fit) — and p = (1 + #{G²* ≥ G²}) / (B + 1) (Davison & Hinkley 1997, ch. 4).
 */
export function bootstrapPValue(strata: readonly Table[], observedG2: number, replicates: number, random: RandomStream): number {
  const multinomial = multinomialSampler(random);
  const simulated = strata.map((t) => ({ rows: t.rows, cols: t.cols, counts: new Float64Array(t.rows * t.cols) }));
  const pooled = strata.map((t) => {
    const cols = new Float64Array(t.cols);
    let total = 0;
    for (let r = 0; r < t.rows; r++) for (let c = 0; c < t.cols; c++) { cols[c] += t.counts[r * t.cols + c]!; total += t.counts[r * t.cols + c]!; }
    return total > 0 ? cols.map((x) => x / total) : cols;
  });
  const rowTotals = strata.map((t) => Array.from({ length: t.rows }, (_, r) => {
    let s = 0;
    for (let c = 0; c < t.cols; c++) s += t.counts[r * t.cols + c]!;
    return s;
  }));
  const draw = new Int32Array(Math.max(...strata.map((t) => t.cols)));
  let atLeast = 0;
  for (let b = 0; b < replicates; b++) {
    strata.forEach((t, s) => {
      const out = simulated[s]!;
      out.counts.fill(0);
      for (let r = 0; r < t.rows; r++) {
        draw.fill(0);
        multinomial(rowTotals[s]![r]!, pooled[s]!, 0, t.cols, draw, 0);
        for (let c = 0; c < t.cols; c++) out.counts[r * t.cols + c] = draw[c]!;
      }
    });
    // A relative slack so that ties with the observed value (same table) count as "at least".
    if (stratifiedIndependence(simulated).g2 >= observedG2 * (1 - 1e-12)) atLeast += 1;
  }
  return (1 + atLeast) / (replicates + 1);
}
