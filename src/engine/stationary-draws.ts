import { communicatingClasses, type ChainClasses } from '../chain/classes.js';
import { stationaryGivenClasses } from '../chain/stationary.js';
import type { MatrixDraws } from '../uncertainty/draws.js';

export interface StationaryDraws {
  /** Stationary mixes of the draws that have a unique one, `[n*k + s]`, n < unique. */
  readonly mixes: Float64Array;
  readonly unique: number;
  /** Draws with two or more closed classes: counted and reported, never averaged in. */
  readonly notUnique: number;
}

/**
 * The stationary mix of every draw. A chain's classes depend only on which entries are positive,
 * and posterior draws nearly all share one pattern, so classes are worked out once per pattern.
 */
export function stationaryOfDraws(draws: MatrixDraws): StationaryDraws {
  const { k, count } = draws;
  const mixes = new Float64Array(count * k);
  const classesByPattern = new Map<string, ChainClasses>();
  let unique = 0;
  for (let d = 0; d < count; d++) {
    const offset = d * k * k;
    let pattern = '';
    for (let c = 0; c < k * k; c++) pattern += draws.data[offset + c]! > 0 ? '1' : '0';
    let classes = classesByPattern.get(pattern);
    if (!classes) {
      classes = communicatingClasses(draws.data, k, offset);
      classesByPattern.set(pattern, classes);
    }
    const result = stationaryGivenClasses(draws.data, k, offset, classes);
    if (!result.unique) continue;
    mixes.set(result.mix, unique * k);
    unique += 1;
  }
  return { mixes: mixes.subarray(0, unique * k), unique, notUnique: count - unique };
}
