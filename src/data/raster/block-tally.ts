/**
 * Transition counts per square block of pixels, tallied while a stack is counted (count-stack.ts):
 * what the spatial block bootstrap resamples on a raster, where per-pixel counts would be 10⁸
 * sites. Memory is bounded by blocks, not pixels: one k² table of 32-bit counts per block and pair
 * of rasters (a 10⁴ × 10⁴ map in 64-pixel blocks: 24,414 blocks; with 10 states, 9.8 MB per pair).
 * A block holds at most side² pixels, so 32-bit counts are exact for any side below 65,536.
 */

/** How the block side was set, carried for the fit's report (the range in pixels, when chosen from it). */
export interface BlockChoice {
  readonly side: number;
  readonly chosenBy: 'range' | 'given';
  readonly range?: { readonly range: number; readonly reached: boolean; readonly spacing: number; readonly sites: number; readonly edgeLag?: number };
}

export class BlockTally {
  /** Blocks per row of blocks, and rows of blocks. */
  readonly across: number;
  readonly down: number;
  /** `pairs[u*T + t]`: blocks × k × k counts, block-major, of pixels whose consecutive valid years are rasters u then t. */
  readonly pairs: (Uint32Array | undefined)[] = [];
  /** Pixels surveyed (valid) at least once, per block: the sites a block stands for. */
  readonly pixels: Float64Array;
  /** States the tables are sized for (grows with the counter's states). */
  k = 0;

  constructor(readonly choice: BlockChoice, width: number, height: number) {
    this.across = Math.ceil(width / choice.side);
    this.down = Math.ceil(height / choice.side);
    this.pixels = new Float64Array(this.across * this.down);
  }

  get count(): number {
    return this.across * this.down;
  }

  /** Each pixel's block in a window (columns x0 … x1 − 1, rows y0 … y1 − 1), row by row, into `into`. */
  blocksOf(x0: number, y0: number, x1: number, y1: number, into: Int32Array): void {
    const side = this.choice.side;
    let p = 0;
    for (let y = y0; y < y1; y++) {
      const row = Math.floor(y / side) * this.across;
      for (let x = x0; x < x1; x++) into[p++] = row + Math.floor(x / side);
    }
  }

  /** Widen every table to k states (k only grows, rarely: once per new class code). */
  resize(k: number): void {
    if (k === this.k) return;
    const old = this.k;
    this.pairs.forEach((m, key) => {
      if (!m) return;
      const out = new Uint32Array(this.count * k * k);
      for (let b = 0; b < this.count; b++) {
        for (let i = 0; i < old; i++) for (let j = 0; j < old; j++) out[(b * k + i) * k + j] = m[(b * old + i) * old + j]!;
      }
      this.pairs[key] = out;
    });
    this.k = k;
  }

  /** The table of one pair of rasters, made on first use. */
  table(key: number): Uint32Array {
    return this.pairs[key] ?? (this.pairs[key] = new Uint32Array(this.count * this.k * this.k));
  }
}
