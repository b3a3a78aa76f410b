import type { RowPeriods } from '../src/chain/row-periods.js';
import { sampleDirichlet } from '../src/uncertainty/dirichlet.js';
import { multinomialSampler } from '../src/uncertainty/multinomial.js';
import type { RandomStream } from '../src/uncertainty/random.js';

/** A row's record simulated from the hierarchical model: T periods of N transitions, each year's row ~ Dirichlet(κp). */
export function simulateRow(p: readonly number[], kappa: number, T: number, N: number, random: RandomStream): RowPeriods {
  const m = p.length;
  const multinomial = multinomialSampler(random);
  const year = new Float64Array(m);
  const counts = new Int32Array(T * m);
  const a = Float64Array.from(p, (x) => x * kappa);
  for (let t = 0; t < T; t++) {
    sampleDirichlet(random, a, 0, m, year, 0);
    multinomial(N, year, 0, m, counts, t * m);
  }
  return {
    row: 0, cells: Int32Array.from({ length: m }, (_, c) => c), times: Array.from({ length: T }, (_, t) => t),
    counts: Float64Array.from(counts), totals: new Float64Array(T).fill(N),
  };
}

