import { Worker } from 'node:worker_threads';
import { workerFile } from '../worker-file.js';
import { drainTasks, DONE, FAILED, NEXT } from './drain-tasks.js';
import { taskCount, runTask, type Phase, type SharedRun } from './engine-tasks.js';

/**
 * Runs a run's phases on `threads` threads: the calling thread and threads − 1 workers, all taking
 * tasks from one shared counter. The engine stays synchronous: the calling thread works too, then
 * waits on the shared control words (Atomics.wait) until every worker is done — workers receive
 * their messages on their own threads, so the wait cannot block them. With one thread no worker
 * is started and every task runs here, in the same code.
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
      for (const w of workers) w.postMessage({ runs, control });
    },
    phase(phase) {
      Atomics.store(control, NEXT, 0);
      Atomics.store(control, DONE, 0);
      Atomics.store(control, FAILED, 0);
      for (const w of workers) w.postMessage({ phase });
      drainTasks(control, taskCount(runs, phase), (task) => runTask(runs, phase, task), false);
      for (let done = Atomics.load(control, DONE); done < workers.length; done = Atomics.load(control, DONE)) {
        Atomics.wait(control, DONE, done);
      }
      if (Atomics.load(control, FAILED)) throw new Error('an engine worker thread failed (its error is on stderr)');
    },
  };
}

/**
 * Workers are kept for the life of the process (a forecast runs several simulations: the run, the
 * uncertainty split's reruns), and unref'd so they never keep it alive.
 */
let kept: Worker[] = [];

function workersFor(n: number): Worker[] {
  if (kept.length !== n) {
    for (const w of kept) void w.terminate();
    kept = Array.from({ length: n }, () => {
      const w = new Worker(workerFile('engine-worker', 'engine', import.meta.url));
      w.unref();
      return w;
    });
  }
  return kept;
}
