import type { Disturbance } from '../scenario/scenario.js';
import type { RandomStream } from '../uncertainty/random.js';
import { blockCount, blockName, DRAW_BLOCK } from '../uncertainty/draw-blocks.js';

/**
 * The years a landscape-scope event strikes, per draw: `hits[d*(horizon+1) + t]` is 1 when it
 * strikes during step t. One uniform is drawn for every (draw, step) from the event's own stream
 * (`random` is the stream named after the event), block b of draws from its sub-stream
 * `block:b` (draw-blocks.ts), whatever its chance, so alternatives that share an event name share
 * its uniforms: the same years when the chance is the same, and coupled years (a higher chance
 * adds years, never moves them) when it differs. In shared memory, for the engine's threads.
 */
export function eventHits(random: RandomStream, event: Disturbance, draws: number, horizon: number): Uint8Array {
  const steps = horizon + 1;
  const hits = new Uint8Array(new SharedArrayBuffer(draws * steps));
  for (let b = 0; b < blockCount(draws); b++) {
    const stream = random.stream(blockName(b));
    const end = Math.min(draws, (b + 1) * DRAW_BLOCK);
    for (let d = b * DRAW_BLOCK; d < end; d++) {
      for (let t = 1; t < steps; t++) hits[d * steps + t] = stream.uniform() < event.chances[t]! ? 1 : 0;
    }
  }
  return hits;
}
