import { largestRemainderOfCounts } from '../scenario/largest-remainder.js';
import { multinomialSampler } from '../uncertainty/multinomial.js';
import type { RandomStream } from '../uncertainty/random.js';
import type { RecordPatterns } from '../chain/record-patterns.js';

/**
 * The states of the `sites` plots a simulated future survey visits, given the latest survey's
 * counts per state.
 *
 * Fewer sites than the latest survey: a stratified random sample of its plots, allocated to the
 * states in proportion to their counts by largest remainder (Hamilton's method; Cochran 1977,
 * Sampling Techniques, §5.5 on proportional allocation), with equal remainders broken in a seeded
 * random order — so no state is left out because of where it falls in the state list. The chain
 * treats the plots of one state alike, so which of them are revisited does not change the
 * forecast; only how many per state does (in the field, pick them at random within each state).
 *
 * As many or more: every latest plot, then new plots whose states are a multinomial draw from the
 * latest mix.
 */
export function resurveyedStates(latest: readonly number[], sites: number, random: RandomStream): number[] {
  const total = latest.reduce((a, b) => a + b, 0);
  const perState = sites <= total
    ? largestRemainderOfCounts(latest, sites, randomOrder(latest.length, random))
    : withNewPlots(latest, sites - total, random);
  const states: number[] = [];
  perState.forEach((n, s) => { for (let i = 0; i < n; i++) states.push(s); });
  return states;
}

function withNewPlots(latest: readonly number[], extra: number, random: RandomStream): number[] {
  const total = latest.reduce((a, b) => a + b, 0);
  const share = Float64Array.from(latest, (n) => n / total);
  const drawn = new Int32Array(latest.length);
  multinomialSampler(random)(extra, share, 0, latest.length, drawn, 0);
  return latest.map((n, s) => n + drawn[s]!);
}

/** A uniformly random permutation of 0 … k − 1 (Fisher & Yates; Durstenfeld 1964). */
function randomOrder(k: number, random: RandomStream): number[] {
  const order = Array.from({ length: k }, (_, i) => i);
  for (let i = k - 1; i > 0; i--) {
    const j = random.integer(i + 1);
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  return order;
}

/**
 * With observer error the sites have records of their own, so the sites to resurvey are picked as
 * sites, not as states: the same stratified sample as resurveyedStates, on the states *recorded* at
 * the latest survey (what the surveyor can see; the true ones are not known), then within each
 * recorded state that many of its sites at random without replacement (a partial Fisher–Yates
 * shuffle). `patterns`: the record pattern of each site picked (record-patterns.ts; several sites
 * of one pattern may be picked); `newPlots`: the sites beyond the latest survey's, new plots.
 */
export function resurveyedSites(records: RecordPatterns, k: number, sites: number, random: RandomStream): { patterns: number[]; newPlots: number } {
  const byState: number[][] = Array.from({ length: k }, () => []);
  for (let q = 0; q < records.count; q++) {
    if (records.extend[q] !== 0) continue;
    const last = records.state[records.start[q + 1]! - 1]!;
    for (let n = 0; n < records.sites[q]!; n++) byState[last]!.push(q);
  }
  const total = byState.reduce((a, s) => a + s.length, 0);
  const picked = Math.min(sites, total);
  const patterns: number[] = [];
  if (picked > 0) {
    const perState = largestRemainderOfCounts(byState.map((s) => s.length), picked, randomOrder(k, random));
    perState.forEach((n, s) => {
      const pool = byState[s]!;
      for (let i = 0; i < n; i++) {
        const j = i + random.integer(pool.length - i);
        [pool[i], pool[j]] = [pool[j]!, pool[i]!];
        patterns.push(pool[i]!);
      }
    });
  }
  return { patterns, newPlots: sites - picked };
}
