import { MessageChannel, Worker, type TransferListItem } from 'node:worker_threads';
import { SereError } from './errors.js';
import { workerFile } from './worker-file.js';

/** The shared words a watcher (worker-watcher.ts) writes: [ENDED] 1 once the worker has ended, [CODE] its exit code, [CAUSE] why. */
export const ENDED = 0;
export const CODE = 1;
export const CAUSE = 2;
export const OUT_OF_MEMORY = 1;
export const THREW = 2;

/**
 * A worker thread whose end the starting thread can see while it waits with Atomics.wait: it is
 * started by a small watcher thread (worker-watcher.ts), which records its exit in shared words.
 * Messages go through a MessagePort (`port` in the worker's workerData) rather than parentPort.
 */
export interface WatchedWorker {
  /** Post to the worker's port (the worker listens on `workerData.port`). */
  post(message: unknown): void;
  /** Throws WORKER_DIED if the worker has ended (call while waiting for it). */
  checkAlive(): void;
  terminate(): void;
}

/** How long one wait lasts before the waiting thread looks whether a worker has ended, in ms. */
export const LOOK_EVERY_MS = 50;

/**
 * Start worker NAME (of folder FOLDER, found as worker-file.ts finds it, from `from`) under a
 * watcher. `data` becomes its workerData, with `port` added (the end of a channel whose other end
 * `post` writes to); `transfer` lists what `data` holds to be moved, not copied. `what` and `hint`
 * make the one-line error if it dies: what was running, and how to avoid it.
 *
 * SERE_WORKER_HEAP_MB (a test hook; unset: Node's default) caps the worker's heap, so tests can
 * make a worker run out of memory for real.
 */
export function startWatched(name: string, folder: string, from: string, data: Record<string, unknown>,
  transfer: TransferListItem[], what: string, hint: string): WatchedWorker {
  const { port1, port2 } = new MessageChannel();
  const life = new Int32Array(new SharedArrayBuffer(3 * 4));
  const heapMb = Number(process.env.SERE_WORKER_HEAP_MB ?? 0) || 0;
  const watcher = new Worker(workerFile('worker-watcher', '', import.meta.url), {
    workerData: { file: workerFile(name, folder, from).href, data: { ...data, port: port2 }, transfer: [...transfer, port2], life, heapMb },
    transferList: [...transfer, port2],
  });
  watcher.unref();
  return {
    post: (message) => port1.postMessage(message),
    checkAlive() {
      if (Atomics.load(life, ENDED) === 0) return;
      const cause = Atomics.load(life, CAUSE);
      const why = cause === OUT_OF_MEMORY ? 'ran out of memory'
        : cause === THREW ? 'failed' : `stopped (exit code ${Atomics.load(life, CODE)})`;
      throw new SereError('WORKER_DIED', `a worker thread ${why} while ${what}`, {}, hint);
    },
    terminate() {
      port1.close();
      void watcher.terminate();
    },
  };
}

/**
 * Wait until `words[index]` is no longer `value`, looking every LOOK_EVERY_MS whether one of
 * `workers` has ended (then WORKER_DIED). A worker that finishes wakes the wait at once (Atomics.notify).
 */
export function waitWhile(words: Int32Array, index: number, value: number, workers: readonly WatchedWorker[]): void {
  while (Atomics.load(words, index) === value) {
    Atomics.wait(words, index, value, LOOK_EVERY_MS);
    if (Atomics.load(words, index) !== value) return;
    for (const w of workers) w.checkAlive();
  }
}
