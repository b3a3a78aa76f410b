/** What a command may touch of the outside world; tests pass their own. */
export interface Io {
  /** Data: tables and JSON. */
  stdout(text: string): void;
  /** Messages, warnings, progress. */
  stderr(text: string): void;
  /**
   * A message worth printing only when the command succeeds (the seed chosen, how to repeat the
   * run): run() holds these and prints them on stderr at the end, so a failing command's stderr is
   * its one error line. Absent: printed at once.
   */
  notice?(text: string): void;
  /** Colour on stdout (a TTY and no NO_COLOR). */
  readonly color: boolean;
  /** A progress bar may be drawn on stderr. */
  readonly progress: boolean;
}

export function processIo(): Io {
  const noColor = process.env['NO_COLOR'] !== undefined && process.env['NO_COLOR'] !== '';
  return {
    stdout: (text) => { process.stdout.write(text); },
    stderr: (text) => { process.stderr.write(text); },
    color: Boolean(process.stdout.isTTY) && !noColor,
    progress: Boolean(process.stderr.isTTY),
  };
}
