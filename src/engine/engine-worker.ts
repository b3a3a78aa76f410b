import { workerData, type MessagePort } from 'node:worker_threads';
import { runTask, taskCount, type Phase, type SharedRun } from './engine-tasks.js';
import { drainTasks } from './drain-tasks.js';

/**
 * A worker thread of the engine (thread-pool.ts), started under a watcher (watched-worker.ts):
 * receives a run's shared arrays on its port, then phases; takes tasks from the shared counter
 * until none are left, and says it is done through the shared control words, which the main
 * thread waits on.
 */
let runs: readonly SharedRun[] = [];
let control: Int32Array | undefined;
(workerData as { port: MessagePort }).port.on('message', (message: { runs: readonly SharedRun[]; control: Int32Array } | { phase: Phase }) => {
  if ('runs' in message) {
    runs = message.runs;
    control = message.control;
    return;
  }
  drainTasks(control!, taskCount(runs, message.phase), (task) => runTask(runs, message.phase, task));
});
