import type { Fit } from '../fit/fit.js';
import { randomStreams } from '../uncertainty/random.js';
import { assumptionTests, type TestReport } from './assumption-tests.js';

/**
 * Do groups of sites (soil types, management units) have different transition probabilities?
 * The homogeneity test across groups (Anderson & Goodman 1957), as `sere fit --by` reports it.
 * Its parametric-bootstrap p-value (only for sparse tables) uses a fixed stream of seed 1, since
 * `sere fit` takes no seed: the same table always gives the same line.
 */
export function groupDifference(fit: Fit): TestReport | null {
  return assumptionTests(fit, { random: randomStreams(1).stream('group-test'), replicates: 999, simulateAll: false }).groups;
}
