import type { Fit } from '../fit/fit.js';
import { randomStreams } from '../uncertainty/random.js';
import { assumptionTests, type TestReport } from './assumption-tests.js';

/**
 * Do groups of sites (soil types, management units) have different transition probabilities?
 * The homogeneity test across groups (Anderson & Goodman 1957), as `sere fit --by` reports it.
 * Its parametric-bootstrap p-value (only for sparse tables) uses a fixed stream of seed 1, since
 * `sere fit` takes no seed: the same table always gives the same line. The order 1 vs 2 test is left
 * out (no triples): it would draw from the same stream first, and a counts table has no triples, so
 * the survey table and its counts table would get different simulated p-values for the same groups.
 */
export function groupDifference(fit: Fit): TestReport | null {
  return assumptionTests({ ...fit, triples: [] }, { random: randomStreams(1).stream('group-test'), replicates: 999, simulateAll: false }).groups;
}
