import { Worker, workerData, type TransferListItem } from 'node:worker_threads';
import { CAUSE, CODE, ENDED, OUT_OF_MEMORY, THREW } from './watched-worker.js';

/**
 * The watcher thread of watched-worker.ts: starts one worker and writes how it ended into shared
 * words the starting thread reads while it waits. A thread blocked in Atomics.wait never hears its
 * own workers' 'exit' events (they are delivered on its event loop), so a worker that died — out
 * of memory, or process.exit — would leave it waiting for ever; this thread's event loop is free.
 */
const { file, data, transfer, life, heapMb } = workerData as {
  file: string; data: unknown; transfer: TransferListItem[]; life: Int32Array; heapMb: number;
};
const child = new Worker(new URL(file), {
  workerData: data, transferList: transfer,
  ...(heapMb > 0 ? { resourceLimits: { maxOldGenerationSizeMb: heapMb, maxYoungGenerationSizeMb: Math.max(1, heapMb / 4) } } : {}),
});
child.on('error', (error: Error & { code?: string }) => {
  Atomics.store(life, CAUSE, error.code === 'ERR_WORKER_OUT_OF_MEMORY' ? OUT_OF_MEMORY : THREW);
});
child.on('exit', (code) => {
  Atomics.store(life, CODE, code);
  Atomics.store(life, ENDED, 1);
  Atomics.notify(life, ENDED);
});

