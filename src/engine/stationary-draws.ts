import { stationaryMix } from '../chain/stationary.js';
import type { MatrixDraws } from '../uncertainty/draws.js';

export interface StationaryDraws {
  /** Stationary mixes of the draws that have a unique one, `[n*k + s]`, n < unique. */
  readonly mixes: Float64Array;
  readonly unique: number;
  /** Draws with two or more closed classes: counted and reported, never averaged in. */
  readonly notUnique: number;
}

export function stationaryOfDraws(draws: MatrixDraws): StationaryDraws {
  const { k, count } = draws;
  const mixes = new Float64Array(count * k);
  let unique = 0;
  for (let d = 0; d < count; d++) {
    const result = stationaryMix(draws.data, k, d * k * k);
    if (!result.unique) continue;
    mixes.set(result.mix, unique * k);
    unique += 1;
  }
  return { mixes: mixes.subarray(0, unique * k), unique, notUnique: count - unique };
}
