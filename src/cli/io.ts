/** What a command may touch of the outside world; tests pass their own. */
export interface Io {
  /** Data: tables and JSON. */
  stdout(text: string): void;
  /** Messages, warnings, progress. */
  stderr(text: string): void;
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
