/**
 * How per-draw results are laid out: [recorded step][state][draw], so that one state's values at
 * one step — what a band summarises — are a contiguous run of `draws` numbers. Summaries then copy
 * a slice instead of gathering with a stride (measured: the gather was ~10% of a comparison).
 */
export interface DrawLayout {
  readonly draws: number;
  /** How many steps were recorded (the length of the trajectory's `recorded` list). */
  readonly slots: number;
  readonly k: number;
}

export function drawIndex(layout: DrawLayout, d: number, r: number, s: number): number {
  return (r * layout.k + s) * layout.draws + d;
}

/** Start of the contiguous run of draws for (recorded step r, state s). */
export function columnStart(layout: DrawLayout, r: number, s: number): number {
  return (r * layout.k + s) * layout.draws;
}

/** One draw's mix at recorded step r (for tests and reports; not for hot loops). */
export function mixAt(values: ArrayLike<number>, layout: DrawLayout, d: number, r: number): number[] {
  return Array.from({ length: layout.k }, (_, s) => values[drawIndex(layout, d, r, s)]!);
}
