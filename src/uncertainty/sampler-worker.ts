import { workerData, type MessagePort } from 'node:worker_threads';
import { drainChains, runChain, type SamplerTask } from './chain-runner.js';
import { runZoneChain } from './zone-posterior.js';

/**
 * A worker thread of the data-augmentation samplers (chain-runner.ts), started under a watcher
 * (watched-worker.ts): receives a task (a job and its shared outputs, or the partial-pooling
 * sampler's) with its control words, runs chains until none are left, and says it is done through the control words.
 */
(workerData as { port: MessagePort }).port.on('message', ({ task, control }: { task: SamplerTask; control: Int32Array }) => {
  drainChains(task, control, 'job' in task ? (c) => runChain(task, c) : (c) => runZoneChain(task, c));
});
