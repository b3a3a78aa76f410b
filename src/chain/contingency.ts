/** A two-way table of counts, row-major. */
export interface Table {
  readonly rows: number;
  readonly cols: number;
  readonly counts: Float64Array;
}

/** Below this expected count the chi-square approximation is doubted (common practice: 5; Cochran 1954). */
export const SMALL_EXPECTED = 5;

export interface IndependenceStatistic {
  /** Likelihood-ratio statistic G² = 2 Σ n ln(n / e). */
  readonly g2: number;
  /** Pearson X² = Σ (n − e)² / e. */
  readonly x2: number;
  readonly df: number;
  /** Cells entering the test (rows and columns with data), and how many have e < SMALL_EXPECTED. */
  readonly cells: number;
  readonly smallCells: number;
  readonly n: number;
}

/**
 * Test of row–column independence summed over strata (each stratum its own table), the form of
 * every Markov-chain test here (Anderson & Goodman 1957; Bishop, Fienberg & Holland 1975, ch. 7):
 * order r against r + 1 (strata: the shorter history; rows: the extra earlier state; columns: the
 * next state) and homogeneity across periods or groups (strata: the from-state; rows: periods or
 * groups; columns: the next state).
 *
 * Degrees of freedom are Σ (r′ − 1)(c′ − 1) over strata, where r′ and c′ count only rows and
 * columns with data: an empty row or column — a structural zero such as an impossible transition,
 * or a state never reached — carries no information and no degree of freedom (BFH 1975, §5.4 on
 * structural zeros). This gives 29, not the nominal 30, on Kullback et al.'s (1962) Table 9.2.
 */
export function stratifiedIndependence(strata: readonly Table[]): IndependenceStatistic {
  let g2 = 0; let x2 = 0; let df = 0; let cells = 0; let smallCells = 0; let n = 0;
  for (const t of strata) {
    const rowSums = new Float64Array(t.rows);
    const colSums = new Float64Array(t.cols);
    let total = 0;
    for (let r = 0; r < t.rows; r++) {
      for (let c = 0; c < t.cols; c++) {
        const v = t.counts[r * t.cols + c]!;
        rowSums[r] += v; colSums[c] += v; total += v;
      }
    }
    const liveRows = rowSums.filter((x) => x > 0).length;
    const liveCols = colSums.filter((x) => x > 0).length;
    n += total;
    if (liveRows < 2 || liveCols < 2) continue;
    df += (liveRows - 1) * (liveCols - 1);
    for (let r = 0; r < t.rows; r++) {
      if (rowSums[r] === 0) continue;
      for (let c = 0; c < t.cols; c++) {
        if (colSums[c] === 0) continue;
        const expected = (rowSums[r]! * colSums[c]!) / total;
        const observed = t.counts[r * t.cols + c]!;
        cells += 1;
        if (expected < SMALL_EXPECTED) smallCells += 1;
        if (observed > 0) g2 += 2 * observed * Math.log(observed / expected);
        x2 += (observed - expected) ** 2 / expected;
      }
    }
  }
  return { g2, x2, df, cells, smallCells, n };
}
