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
