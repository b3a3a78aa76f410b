/**
 * Draws are made and run in fixed blocks of this many, each block with its own named random
 * sub-streams (`stream('matrices').stream('block:3')`, likewise for event years and plot noise), so
 * a block's numbers are the same whichever thread runs it and however many threads there are. A
 * constant, never derived from the machine. 1,024 draws × 100 years × 10 states is 10⁷
 * multiply-adds, a few milliseconds: fine enough to share two or three cores evenly, coarse
 * enough that making a block's streams (a SHA-256 each) costs nothing.
 */
export const DRAW_BLOCK = 1024;

export function blockCount(draws: number): number {
  return Math.ceil(draws / DRAW_BLOCK);
}

/** The name of block b's sub-stream. */
export function blockName(b: number): string {
  return `block:${b}`;
}

/** A Float64Array other threads can read and write (worker_threads share SharedArrayBuffers, not ArrayBuffers). */
export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * 8));
}
