import { communicatingClasses, type ChainClasses } from '../chain/classes.js';
import { stationaryInKernel } from '../uncertainty/year-kernel.js';

/**
 * Stationary mix of a k×k matrix at `offset`, or null when not unique; classes cached by sparsity
 * pattern. Consecutive draws nearly always share a pattern, so it is first compared with the last
 * one's, byte by byte: building the pattern's string key for every draw (k² concatenations and a
 * hash) cost more than the stationary mix itself (measured on 100,000 draws of 10 states). The mix
 * is worked out in the kernel (year-kernel.ts stationaryInKernel: chain/stationary.ts's operations,
 * so its bits) and is a view of its scratch: read it before the next call.
 */
export function stationaryByPattern(k: number): (p: Float64Array, offset: number) => Float64Array | null {
  const k2 = k * k;
  const membersByPattern = new Map<string, Int32Array | null>();
  const pattern = new Uint8Array(k2);
  const last = new Uint8Array(k2);
  let seen = false;
  let lastMembers: Int32Array | null = null;
  return (p, offset) => {
    let same = seen;
    for (let c = 0; c < k2; c++) {
      const bit = p[offset + c]! > 0 ? 1 : 0;
      pattern[c] = bit;
      if (bit !== last[c]) same = false;
    }
    if (!same) {
      const key = String.fromCharCode(...pattern);
      let found = membersByPattern.get(key);
      if (found === undefined) {
        found = closedMembers(communicatingClasses(p, k, offset));
        membersByPattern.set(key, found);
      }
      lastMembers = found;
      seen = true;
      last.set(pattern);
    }
    return lastMembers ? stationaryInKernel(p, k, offset, lastMembers) : null;
  };
}

/** The states of the one closed class, or null when there are two or more (no unique long-run mix: stationaryGivenClasses). */
function closedMembers({ classes, closed }: ChainClasses): Int32Array | null {
  const closedClasses = classes.filter((_, c) => closed[c]);
  return closedClasses.length === 1 ? Int32Array.from(closedClasses[0]!) : null;
}
