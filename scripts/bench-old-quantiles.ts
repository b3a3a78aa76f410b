/**
 * The bands' quantile method before bucket counting, kept only so `npm run bench` can time the two
 * side by side: type-7 quantiles by Hoare's selection rank by rank on the column, reordering it,
 * with the upper neighbour of each rank found as the minimum of everything right of it.
 */
import { select } from './bands-reference.js';

export function quantilesBySelection(sample: Float64Array, probabilities: readonly number[]): number[] {
  const n = sample.length;
  const out: number[] = [];
  let from = 0;
  for (const p of probabilities) {
    const h = (n - 1) * p;
    const i = Math.floor(h);
    select(sample, i, from, n - 1);
    const below = sample[i]!;
    if (h === i || i + 1 >= n) {
      out.push(below);
    } else {
      let above = Infinity;
      for (let j = i + 1; j < n; j++) if (sample[j]! < above) above = sample[j]!;
      out.push(below + (above - below) * (h - i));
    }
    from = i;
  }
  return out;
}
