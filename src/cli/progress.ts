import { SingleBar } from 'cli-progress';

/** Work shorter than this gets no bar at all: a flash of a bar is noise. */
const SHOW_AFTER_MS = 1000;

/**
 * A progress reporter for long runs: nothing unless stderr is a TTY, and nothing until the work
 * has taken SHOW_AFTER_MS; then a bar on stderr (never stdout, which carries data).
 */
export function progressReporter(enabled: boolean, label: string, unit = 'draws'): { update(done: number, total: number): void; stop(): void } {
  if (!enabled) return { update: () => undefined, stop: () => undefined };
  const started = Date.now();
  let bar: SingleBar | undefined;
  return {
    update(done, total) {
      if (!bar && Date.now() - started < SHOW_AFTER_MS) return;
      if (!bar) {
        bar = new SingleBar({ format: unit === 'percent' ? `${label} [{bar}] {percentage}%` : `${label} [{bar}] {percentage}% · {value}/{total} ${unit}`, stream: process.stderr, hideCursor: true, clearOnComplete: true });
        bar.start(total, done);
      }
      bar.update(done);
    },
    stop() { bar?.stop(); },
  };
}
