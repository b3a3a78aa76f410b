/**
 * Split `total` whole units in proportion to `shares` (summing to 1): each gets the floor of its
 * quota, and the units left over go to the largest remainders (Hamilton's method), ties to the
 * earlier state. The result sums to `total` exactly.
 */
export function largestRemainder(shares: readonly number[], total: number): number[] {
  const quotas = shares.map((s) => s * total);
  const counts = quotas.map(Math.floor);
  let left = total - counts.reduce((a, b) => a + b, 0);
  const order = quotas.map((q, i) => ({ i, r: q - Math.floor(q) })).sort((a, b) => b.r - a.r || a.i - b.i);
  for (const { i } of order) {
    if (left <= 0) break;
    counts[i]! += 1;
    left -= 1;
  }
  return counts;
}

/**
 * Split `total` whole units in proportion to whole-number `counts` by the same method, in exact
 * integer arithmetic (quota countsᵢ·total / Σ counts, remainder countsᵢ·total mod Σ counts), so
 * equal remainders really tie. Ties go to the state that comes first in `tieOrder` (a permutation
 * of the states; default state order): a caller that wants ties broken at random passes a random
 * permutation. The result sums to `total` exactly.
 */
export function largestRemainderOfCounts(counts: readonly number[], total: number,
  tieOrder: readonly number[] = counts.map((_, i) => i)): number[] {
  const sum = counts.reduce((a, b) => a + b, 0);
  if (sum <= 0) throw new Error('internal: largest remainder of counts that sum to zero');
  const out = counts.map((n) => Math.floor((n * total) / sum));
  let left = total - out.reduce((a, b) => a + b, 0);
  const rank = new Array<number>(counts.length);
  tieOrder.forEach((s, r) => { rank[s] = r; });
  const order = counts.map((n, i) => ({ i, r: (n * total) % sum })).sort((a, b) => b.r - a.r || rank[a.i]! - rank[b.i]!);
  for (const { i } of order) {
    if (left <= 0) break;
    out[i]! += 1;
    left -= 1;
  }
  return out;
}
