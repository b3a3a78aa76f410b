/**
 * The control words threads share for one phase: [0] the next task to take, [1] how many workers
 * have finished, [2] set to 1 when a task failed. Each thread takes tasks with an atomic
 * increment until none are left, so the work spreads itself however fast each thread runs.
 */
export const NEXT = 0;
export const DONE = 1;
export const FAILED = 2;

/** Take and run tasks until none are left; then count this worker as done and wake the waiting thread. */
export function drainTasks(control: Int32Array, count: number, run: (task: number) => void, isWorker = true): void {
  try {
    for (let task = Atomics.add(control, NEXT, 1); task < count; task = Atomics.add(control, NEXT, 1)) run(task);
  } catch (error) {
    Atomics.store(control, FAILED, 1);
    if (!isWorker) throw error;
    console.error(error);
  } finally {
    if (isWorker) {
      Atomics.add(control, DONE, 1);
      Atomics.notify(control, DONE);
    }
  }
}
