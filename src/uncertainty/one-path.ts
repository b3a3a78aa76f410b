import type { RecordPatterns } from '../chain/record-patterns.js';
import { drawCategorical } from './categorical.js';
import type { CompletedRecords, PathScratch } from './error-sampler.js';
import type { SweepTables } from './sweep-tables.js';

/**
 * The backward-sampling half of error-sampler.ts for a record pattern of one site — almost every
 * pattern once sites have a dozen surveys with some missed, since their records then differ — as
 * one state carried from step to step instead of k counts: X_{T−1} ~ α̂_{T−1}, carried to the
 * latest survey time through P, then X_t | X_{t+1} = b ~ α̂_t(a)·P[a, b] normalised (Carter & Kohn
 * 1994). Each draw is `drawCategorical`, which takes the uniforms Multinomial(1, ·) takes, in the
 * same order as the general path, so the sweep's draws are the same bit for bit as when every
 * pattern went through the multinomial (test/uncertainty/one-path.test.ts).
 * `scratch` holds the pattern's filtered laws and their supports (T × k, `forwardFilter`); its `q` is k of
 * scratch for the weights. The draws read P through the sweep's tables (sweep-tables.ts).
 */
export function sampleOnePath(records: RecordPatterns, q: number, T: number, tables: SweepTables, uniform: () => number,
  scratch: PathScratch, out: CompletedRecords): void {
  const { k, p, pT, pLast } = tables;
  const { filter, support, supportCount, q: weights } = scratch;
  const first = records.start[q]!;
  const kk = k * k;
  // The last positive entry of the last filtered law: the last of its support.
  let b = drawCategorical(uniform, filter, (T - 1) * k, support[(T - 1) * k + supportCount[T - 1]! - 1]! + 1);
  const steps = records.extend[q]!;
  if (steps >= 0) {
    // Carried from the last survey to the latest survey time; these steps are part of the path (error-sampler.ts).
    let now = b;
    for (let t = 0; t < steps; t++) {
      const after = drawCategorical(uniform, p, now * k, pLast[now]! + 1);
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
    const column = b * k;
    let total = 0;
    for (let a = 0; a < k; a++) total += weights[a] = filter[row + a]! * pT[column + a]!;
    // drawCategorical over weights / total, each share divided out only when the draw reaches it:
    // the same quotients, compared in the same order, taking the same uniforms.
    let last = 0;
    for (let a = k - 1; a > 0; a--) {
      if (weights[a]! > 0 && weights[a]! / total > 0) { last = a; break; }
    }
    let a = last;
    let mass = 1;
    for (let j = 0; j < last; j++) {
      const w = weights[j]! / total;
      if (w >= mass) { a = j; break; }
      if (w > 0) {
        const chance = w / mass;
        if (chance >= 1 || uniform() < chance) { a = j; break; }
      }
      mass -= w;
    }
    out.transitions[a * k + b] += 1;
    b = a;
  }
  out.first[b] += 1;
}
