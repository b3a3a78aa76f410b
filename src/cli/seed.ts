import type { Scenario } from '../scenario/scenario.js';
import { freshSeed } from '../uncertainty/random.js';
import type { Io } from './io.js';

/** The flag's seed, else the scenario's, else a fresh one — announced on stderr so the run can be repeated. */
export function chooseSeed(scenario: Scenario, flag: number | undefined, io: Io): number {
  const seed = flag ?? scenario.seed ?? freshSeed();
  if (flag === undefined && scenario.seed === undefined) {
    io.stderr(`${scenario.file}: no seed given; using seed ${seed} (add "seed: ${seed}" under uncertainty to repeat this run)\n`);
  }
  return seed;
}
