import type { RecordPatterns } from '../chain/record-patterns.js';
import { drawCategorical, lastPositive } from './categorical.js';
import type { CompletedRecords } from './error-sampler.js';

/**
 * The backward-sampling half of error-sampler.ts for a record pattern of one site — almost every
 * pattern once sites have a dozen surveys with some missed, since their records then differ — as
 * one state carried from step to step instead of k counts: X_{T−1} ~ α̂_{T−1}, carried to the
 * latest survey time through P, then X_t | X_{t+1} = b ~ α̂_t(a)·P[a, b] normalised (Carter & Kohn
 * 1994). Each draw is `drawCategorical`, which takes the uniforms Multinomial(1, ·) takes, in the
 * same order as the general path, so the sweep's draws are the same bit for bit as when every
 * pattern went through the multinomial (test/uncertainty/one-path.test.ts).
 * `filter` holds the pattern's filtered laws (T × k, `forwardFilter`); `weights` is k of scratch.
 */
export function sampleOnePath(records: RecordPatterns, q: number, T: number, p: Float64Array, k: number, uniform: () => number,
  filter: Float64Array, weights: Float64Array, out: CompletedRecords): void {
  const first = records.start[q]!;
  const kk = k * k;
  let b = drawCategorical(uniform, filter, (T - 1) * k, lastPositive(filter, (T - 1) * k, k) + 1);
  const steps = records.extend[q]!;
  if (steps >= 0) {
    // Carried from the last survey to the latest survey time; these steps are part of the path (error-sampler.ts).
    let now = b;
    for (let t = 0; t < steps; t++) {
      const after = drawCategorical(uniform, p, now * k, lastPositive(p, now * k, k) + 1);
      out.transitions[now * k + after] += 1;
      now = after;
    }
    out.latest[now] += 1;
  }
  let s = records.start[q + 1]! - 1;
  for (let t = T - 1; ; t--) {
    if (s >= first && records.at[s] === t) {
      out.recorded[records.matrix[s]! * kk + records.state[s]! + b * k] += 1;
      s -= 1;
    }
    if (t === 0) break;
    const row = (t - 1) * k;
    let total = 0;
    for (let a = 0; a < k; a++) total += weights[a] = filter[row + a]! * p[a * k + b]!;
    let last = 0;
    for (let a = 0; a < k; a++) {
      const w = weights[a]! / total;
      weights[a] = w;
      if (w > 0) last = a;
    }
    const a = drawCategorical(uniform, weights, 0, last + 1);
    out.transitions[a * k + b] += 1;
    b = a;
  }
  out.first[b] += 1;
}
