import { patternLength, type RecordPatterns } from './record-patterns.js';

/**
 * The distinct record prefixes of the record patterns: two sites whose records agree up to step t
 * (the same surveys, recorded states and error matrices at the same steps, and none between) have
 * the same filtered law at t, so the forward filter is computed once per prefix. At the `observer`
 * bench's size (10,000 sites × 12 surveys × 8 states) the 115,531 steps of the 9,986 patterns are
 * 64,260 prefixes.
 *
 * Prefix n extends prefix `parent[n]` (−1: a first survey) by one step, surveyed with emission
 * column `column[n]` = matrix · k + recorded state, or not surveyed (−1); a parent always comes
 * before its children, so pattern q's last step has the largest number of q's prefixes (the path
 * kernel filters every prefix up to it just before drawing q). Pattern q's step t is prefix
 * `nodeOf[nodeStart[q] + t]`.
 */
export interface RecordPrefixes {
  readonly count: number;
  readonly parent: Int32Array;
  readonly column: Int32Array;
  readonly nodeStart: Int32Array;
  readonly nodeOf: Int32Array;
}

export function recordPrefixes(records: RecordPatterns, k: number): RecordPrefixes {
  const nodeStart = new Int32Array(records.count + 1);
  for (let q = 0; q < records.count; q++) nodeStart[q + 1] = nodeStart[q]! + patternLength(records, q);
  const nodeOf = new Int32Array(nodeStart[records.count]!);
  const parent: number[] = [];
  const column: number[] = [];
  // A child's key: its parent and its step's symbol (0: not surveyed, 1 + column), as one exact number.
  let matrices = 1;
  for (const m of records.matrix) matrices = Math.max(matrices, m + 1);
  const symbols = matrices * k + 1;
  const index = new Map<number, number>();
  for (let q = 0; q < records.count; q++) {
    const end = records.start[q + 1]!;
    let s = records.start[q]!;
    let up = -1;
    for (let t = 0; t < patternLength(records, q); t++) {
      const surveyed = s < end && records.at[s] === t;
      const col = surveyed ? records.matrix[s]! * k + records.state[s]! : -1;
      if (surveyed) s += 1;
      const key = (up + 1) * symbols + col + 1;
      let node = index.get(key);
      if (node === undefined) {
        node = parent.length;
        index.set(key, node);
        parent.push(up);
        column.push(col);
      }
      nodeOf[nodeStart[q]! + t] = node;
      up = node;
    }
  }
  return { count: parent.length, parent: Int32Array.from(parent), column: Int32Array.from(column), nodeStart, nodeOf };
}
