import { availableParallelism } from 'node:os';
import { blockCount } from '../uncertainty/draw-blocks.js';

/**
 * Least work (draws × steps × k² × scenarios: the projection's multiply-adds) worth starting worker
 * threads for when no thread count is asked. A worker costs 30–50 ms to start (a fresh V8 isolate
 * loading the engine); the projection runs at roughly 10⁹ multiply-adds per second on one core
 * (`npm run bench -- engine`), so a second thread saves about work / 2·10⁹ s, which passes 50 ms
 * at 10⁸. Below it (the demo's 4,000 draws × 31 years × 5 states is 3·10⁶) one thread is faster.
 */
export const MIN_THREADED_WORK = 1e8;

/**
 * Threads a run uses: the number asked (`--threads`), else every core the process may use when the
 * run is large enough (MIN_THREADED_WORK), else one; never more than there are blocks of draws.
 * Results do not depend on it (draw-blocks.ts).
 */
export function threadsFor(requested: number | undefined, draws: number, steps: number, k: number, scenarios: number): number {
  const wanted = requested ?? (draws * steps * k * k * scenarios >= MIN_THREADED_WORK ? availableParallelism() : 1);
  return Math.max(1, Math.min(wanted, blockCount(draws)));
}
