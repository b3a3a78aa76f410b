import { communicatingClasses, type ChainClasses } from '../chain/classes.js';
import { closedClassesOf } from '../chain/stationary.js';
import { stationaryInKernel } from '../uncertainty/year-kernel.js';

/**
 * Stationary mix of a k×k matrix at `offset`, or null when not unique; classes cached by sparsity
 * pattern. Consecutive draws nearly always share a pattern, so it is first compared with the last
 * one's, byte by byte: building the pattern's string key for every draw (k² concatenations and a
 * hash) cost more than the stationary mix itself (measured on 100,000 draws of 10 states). The mix
 * is worked out in the kernel (year-kernel.ts stationaryInKernel: chain/stationary.ts's operations,
 * so its bits) and is a view of its scratch: read it before the next call. A class, not a closure:
 * a new closure per block of draws was a new call target for every caller, which V8 threw its
 * optimised code away for (`--trace-deopt`: "wrong call target").
 */
export class StationaryByPattern {
  private readonly k2: number;
  private readonly membersByPattern = new Map<string, Int32Array | null>();
  private readonly pattern: Uint8Array;
  private readonly last: Uint8Array;
  private seen = false;
  private lastMembers: Int32Array | null = null;

  constructor(private readonly k: number) {
    this.k2 = k * k;
    this.pattern = new Uint8Array(this.k2);
    this.last = new Uint8Array(this.k2);
  }

  mixOf(p: Float64Array, offset: number): Float64Array | null {
    const { k, k2, pattern, last } = this;
    let same = this.seen;
    for (let c = 0; c < k2; c++) {
      const bit = p[offset + c]! > 0 ? 1 : 0;
      pattern[c] = bit;
      if (bit !== last[c]) same = false;
    }
    if (!same) {
      const key = String.fromCharCode(...pattern);
      let found = this.membersByPattern.get(key);
      if (found === undefined) {
        found = closedMembers(communicatingClasses(p, k, offset));
        this.membersByPattern.set(key, found);
      }
      this.lastMembers = found;
      this.seen = true;
      last.set(pattern);
    }
    return this.lastMembers ? stationaryInKernel(p, k, offset, this.lastMembers) : null;
  }
}

/** The states of the one closed class, or null when there are two or more (no unique long-run mix: chain/stationary.ts). */
function closedMembers(classes: ChainClasses): Int32Array | null {
  const closed = closedClassesOf(classes);
  return closed.length === 1 ? Int32Array.from(closed[0]!) : null;
}
