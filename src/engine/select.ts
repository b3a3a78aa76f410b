/**
 * Hoare's selection (quickselect, Hoare 1961) with a median-of-three pivot: afterwards a[k] holds
 * the k-th smallest of a[lo…hi], everything before it is ≤ and everything after is ≥.
 *
 * The bands' order statistics (`order-statistics.ts`) use it only where bucket counting cannot
 * narrow a column: a value range that is not finite, or buckets that stay crowded after a few
 * rounds. It used to select every band directly (measured 2× faster than sorting); bucket counting
 * replaced that, see `order-statistics.ts` for the measurement.
 */
export function select(a: Float64Array, k: number, lo: number, hi: number): void {
  while (hi > lo) {
    const x = a[lo]!;
    const y = a[(lo + hi) >> 1]!;
    const z = a[hi]!;
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        const t = a[i]!;
        a[i] = a[j]!;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}
