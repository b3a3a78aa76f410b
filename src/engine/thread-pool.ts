import { startWatched, waitWhile, type WatchedWorker } from '../watched-worker.js';
import { drainTasks, DONE, FAILED, NEXT } from './drain-tasks.js';
import { taskCount, runTask, type Phase, type SharedRun } from './engine-tasks.js';

/**
 * Runs a run's phases on `threads` threads: the calling thread and threads − 1 workers, all taking
 * tasks from one shared counter. The engine stays synchronous: the calling thread works too, then
 * waits on the shared control words (Atomics.wait) until every worker is done — workers receive
 * their messages on their own threads, so the wait cannot block them. With one thread no worker
 * is started and every task runs here, in the same code. Workers run under watchers
 * (watched-worker.ts): one that dies — out of memory, say — ends the wait with WORKER_DIED instead
 * of leaving the caller waiting for ever.
 */
export interface Pool {
  /** Hand a run's shared arrays to the workers; then `phase` any number of times. */
  start(runs: readonly SharedRun[]): void;
  phase(phase: Phase): void;
}

export function makePool(threads: number): Pool {
  const workers = threads > 1 ? workersFor(threads - 1) : [];
  const control = new Int32Array(new SharedArrayBuffer(3 * 4));
  let runs: readonly SharedRun[] = [];
  return {
    start(r) {
      runs = r;
      for (const w of workers) w.post({ runs, control });
    },
    phase(phase) {
      Atomics.store(control, NEXT, 0);
      Atomics.store(control, DONE, 0);
      Atomics.store(control, FAILED, 0);
      for (const w of workers) w.post({ phase });
      drainTasks(control, taskCount(runs, phase), (task) => runTask(runs, phase, task), false);
      try {
        for (let done = Atomics.load(control, DONE); done < workers.length; done = Atomics.load(control, DONE)) {
          waitWhile(control, DONE, done, workers);
        }
      } catch (error) {
        // The survivors may be mid-task on arrays the caller will drop: start afresh next time.
        for (const w of kept) w.terminate();
        kept = [];
        throw error;
      }
      if (Atomics.load(control, FAILED)) throw new Error('an engine worker thread failed (its error is on stderr)');
    },
  };
}

/**
 * Workers are kept for the life of the process (a forecast runs several simulations: the run, the
 * uncertainty split's reruns); their watchers are unref'd so they never keep it alive.
 */
let kept: WatchedWorker[] = [];

function workersFor(n: number): WatchedWorker[] {
  if (kept.length !== n) {
    for (const w of kept) w.terminate();
    kept = Array.from({ length: n }, () => startWatched('engine-worker', 'engine', import.meta.url, {}, [],
      'running the forecast', 'use fewer draws (--draws), a shorter horizon, or --threads 1'));
  }
  return kept;
}
