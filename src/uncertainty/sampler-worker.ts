import { workerData, type MessagePort } from 'node:worker_threads';
import { drainChains, type ChainTask } from './chain-runner.js';

/**
 * A worker thread of the data-augmentation samplers (chain-runner.ts), started under a watcher
 * (watched-worker.ts): receives a task (the job and the shared outputs) with its control words,
 * runs chains until none are left, and says it is done through the control words.
 */
(workerData as { port: MessagePort }).port.on('message', (message: { task: ChainTask; control: Int32Array }) => {
  drainChains(message.task, message.control);
});
