import { Command, CommanderError } from 'commander';
import { SereError, escapeUnprintable, formatError } from '../errors.js';
import { TOOL_VERSION } from '../version.js';
import { registerFit } from './fit-command.js';
import { registerForecast } from './forecast-command.js';
import { registerCompare } from './compare-command.js';
import { registerCheck } from './check-command.js';
import { registerSeason } from './season-command.js';
import { registerHindcast } from './hindcast-command.js';
import { registerEffort } from './effort-command.js';
import { registerCount } from './count-command.js';
import type { Io } from './io.js';

/** Exit codes: the public surface, documented in the README. */
export const EXIT = { ok: 0, badInput: 1, usage: 2, internal: 70 } as const;

/**
 * The whole CLI as a function: parse `argv`, run one command, return the exit code. The
 * executable only calls this; tests call it directly with their own `io`.
 */
export async function run(argv: readonly string[], outer: Io): Promise<number> {
  const notices: string[] = [];
  const io: Io = { ...outer, notice: (text) => { notices.push(text); } };
  // Usage errors read like bad-input errors: "sere: error: option '--seed <n>' …" (exit 2).
  const output = { writeOut: (s: string) => io.stdout(s), writeErr: (s: string) => io.stderr(s.startsWith('error:') ? `sere: ${s}` : s) };
  const program = new Command('sere')
    .description('Forecast how the mix of land states changes, from repeated site surveys (fitted Markov chains).')
    .version(TOOL_VERSION)
    .option('--debug', 'print a stack trace for internal errors')
    .exitOverride()
    .configureOutput(output)
    .showHelpAfterError('(run sere --help for usage)');
  registerFit(program, io);
  registerForecast(program, io);
  registerCompare(program, io);
  registerCheck(program, io);
  registerSeason(program, io);
  registerHindcast(program, io);
  registerEffort(program, io);
  registerCount(program, io);
  for (const command of program.commands) command.exitOverride().configureOutput(output);

  try {
    await program.parseAsync([...argv], { from: 'user' });
    for (const text of notices) io.stderr(text);
    return EXIT.ok;
  } catch (err) {
    if (err instanceof CommanderError) {
      // Help and --version exit 0; every other commander error (unknown option, missing argument, no command) is usage.
      return err.exitCode === 0 ? EXIT.ok : EXIT.usage;
    }
    const debug = argv.includes('--debug');
    if (err instanceof SereError) {
      // With --debug the code is printed too, so scripts and tests can tell errors apart without the wording.
      io.stderr(`sere: error${debug ? ` [${err.code}]` : ''}: ${formatError(err)}\n`);
      return EXIT.badInput;
    }
    // Without --debug, one escaped line: an internal error may echo input (a label in a library's message).
    const detail = err instanceof Error ? (debug ? err.stack ?? err.message : escapeUnprintable(err.message.split('\n')[0]!.slice(0, 500))) : String(err);
    io.stderr(`sere: internal error: ${detail}\n${debug ? '' : '(run again with --debug for details, and please report it)\n'}`);
    return EXIT.internal;
  }
}
