/**
 * Proper scores of a categorical forecast against observed counts (Gneiting & Raftery 2007,
 * "Strictly proper scoring rules, prediction, and estimation", JASA 102:359–378). Both are means per
 * observed site; lower is better.
 *
 * - Log score (ignorance): −(1/N) Σₛ nₛ ln pₛ. A state observed but given probability 0 scores
 *   Infinity — the forecast said it was impossible.
 * - Brier score (multi-category): (1/N) Σₛ nₛ Σⱼ (pⱼ − [j = s])².
 */
export function logScore(probabilities: readonly number[], counts: readonly number[]): number {
  let total = 0;
  let n = 0;
  counts.forEach((c, s) => {
    if (c === 0) return;
    total -= c * Math.log(probabilities[s]!);
    n += c;
  });
  return total / n;
}

export function brierScore(probabilities: readonly number[], counts: readonly number[]): number {
  const sumSquares = probabilities.reduce((a, p) => a + p * p, 0);
  let total = 0;
  let n = 0;
  counts.forEach((c, s) => {
    if (c === 0) return;
    // Σⱼ (pⱼ − [j = s])² = Σⱼ pⱼ² − 2pₛ + 1
    total += c * (sumSquares - 2 * probabilities[s]! + 1);
    n += c;
  });
  return total / n;
}

/** How many of the observed values fall inside their bands (ends included). */
export function covered(observed: readonly number[], low: readonly number[], high: readonly number[]): number {
  return observed.reduce((a, x, s) => a + (x >= low[s]! && x <= high[s]! ? 1 : 0), 0);
}

/**
 * Skill score against a reference forecast: 1 − S / S_ref for a negatively oriented score S
 * (Brier 1950; Gneiting & Raftery 2007, sec. 2.3). 1 is perfect, 0 no better than the
 * reference, negative worse. Null when the reference scored a perfect 0 (nothing to improve on).
 */
export function skill(score: number, reference: number): number | null {
  return reference === 0 ? null : 1 - score / reference;
}
