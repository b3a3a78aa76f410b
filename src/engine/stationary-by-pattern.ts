import { communicatingClasses, type ChainClasses } from '../chain/classes.js';
import { stationaryGivenClasses } from '../chain/stationary.js';

/**
 * Stationary mix of a k×k matrix at `offset`, or null when not unique; classes cached by sparsity
 * pattern. Consecutive draws nearly always share a pattern, so it is first compared with the last
 * one's, byte by byte: building the pattern's string key for every draw (k² concatenations and a
 * hash) cost more than the stationary mix itself (measured on 100,000 draws of 10 states).
 */
export function stationaryByPattern(k: number): (p: Float64Array, offset: number) => Float64Array | null {
  const k2 = k * k;
  const classesByPattern = new Map<string, ChainClasses>();
  const pattern = new Uint8Array(k2);
  const last = new Uint8Array(k2);
  let lastClasses: ChainClasses | undefined;
  return (p, offset) => {
    let same = lastClasses !== undefined;
    for (let c = 0; c < k2; c++) {
      const bit = p[offset + c]! > 0 ? 1 : 0;
      pattern[c] = bit;
      if (bit !== last[c]) same = false;
    }
    if (!same) {
      const key = String.fromCharCode(...pattern);
      let found = classesByPattern.get(key);
      if (!found) {
        found = communicatingClasses(p, k, offset);
        classesByPattern.set(key, found);
      }
      lastClasses = found;
      last.set(pattern);
    }
    const result = stationaryGivenClasses(p, k, offset, lastClasses!);
    return result.unique ? result.mix : null;
  };
}
