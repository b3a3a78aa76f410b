import { largestRemainderOfCounts } from '../scenario/largest-remainder.js';
import { multinomialSampler } from '../uncertainty/multinomial.js';
import type { RandomStream } from '../uncertainty/random.js';

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
