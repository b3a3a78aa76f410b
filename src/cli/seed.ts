import type { Scenario } from '../scenario/scenario.js';
import { freshSeed } from '../uncertainty/random.js';
import type { Io } from './io.js';

/**
 * The flag's seed, else the file's, else a fresh one — announced on stderr with how to repeat the
 * run, since a seed nobody chose must still be printed.
 */
function pickSeed(flag: number | undefined, fromFile: number | undefined, io: Io, announce: (seed: number) => string): number {
  const seed = flag ?? fromFile ?? freshSeed();
  if (flag === undefined && fromFile === undefined) (io.notice ?? io.stderr)(`${announce(seed)}\n`);
  return seed;
}

/** For a scenario: repeat by writing the seed into the scenario file. */
export function chooseSeed(scenario: Scenario, flag: number | undefined, io: Io): number {
  return pickSeed(flag, scenario.seed, io, (seed) =>
    `${scenario.file}: no seed given; using seed ${seed} (add "seed: ${seed}" under uncertainty to repeat this run)`);
}

/** For a command with only a --seed flag. */
export function flagSeed(flag: number | undefined, io: Io): number {
  return pickSeed(flag, undefined, io, (seed) => `no seed given; using seed ${seed} (pass --seed ${seed} to repeat this run)`);
}
