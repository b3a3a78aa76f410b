import { Command, CommanderError } from 'commander';
import { SereError, escapeUnprintable, formatError } from '../errors.js';
import { TOOL_VERSION } from '../version.js';
import type { Io } from './io.js';

type Register = (program: Command, io: Io) => void;

/**
 * Each command's module, in the order `sere --help` lists them, loaded only when needed: a run
 * names one command, and only that command's code (and the libraries it uses) is compiled and
 * evaluated — `sere --version` and `sere forecast` do not pay for the fit table, the diagnostics,
 * workspaces or counting. Measured with `node --cpu-prof` (DEVELOPERS.md, Benchmarks). `init` and
 * `season` share a module.
 */
const COMMANDS: readonly (readonly [names: readonly string[], load: () => Promise<Register>])[] = [
  [['fit'], async () => (await import('./fit-command.js')).registerFit],
  [['forecast'], async () => (await import('./forecast-command.js')).registerForecast],
  [['compare'], async () => (await import('./compare-command.js')).registerCompare],
  [['check'], async () => (await import('./check-command.js')).registerCheck],
  [['init', 'season'], async () => (await import('./season-command.js')).registerSeason],
  [['hindcast'], async () => (await import('./hindcast-command.js')).registerHindcast],
  [['effort'], async () => (await import('./effort-command.js')).registerEffort],
  [['count'], async () => (await import('./count-command.js')).registerCount],
];

/**
 * The commands to register for `argv`: the one it names (the first word that is not an option:
 * the program's own options take no values), none for `--version` alone, and every one otherwise
 * (help, an unknown command, no command), so usage and help read as they always did.
 */
async function commandsFor(argv: readonly string[]): Promise<Register[]> {
  const named = commandNamed(argv.find((a) => !a.startsWith('-')));
  if (named) return [await named[1]()];
  if (argv.length > 0 && argv.every((a) => a === '--version' || a === '-V')) return [];
  return Promise.all(COMMANDS.map(([, load]) => load()));
}

/** The entry of COMMANDS that answers to `word`, if any. */
function commandNamed(word: string | undefined): (typeof COMMANDS)[number] | undefined {
  return word === undefined ? undefined : COMMANDS.find(([names]) => names.includes(word));
}

/** Exit codes: the public surface, documented in the README. */
export const EXIT = { ok: 0, badInput: 1, usage: 2, internal: 70 } as const;

/**
 * The whole CLI as a function: parse `argv`, run one command, return the exit code. The
 * executable only calls this; tests call it directly with their own `io`.
 */
export async function run(argv: readonly string[], outer: Io): Promise<number> {
  const notices: string[] = [];
  const io: Io = { ...outer, notice: (text) => { notices.push(text); } };
  // `sere help NAME` for a name that is no command: commander would print the whole usage without saying why.
  const words = argv.filter((a) => !a.startsWith('-'));
  if (words[0] === 'help' && words[1] !== undefined && !commandNamed(words[1])) {
    io.stderr(`sere: error: unknown command '${escapeUnprintable(words[1].slice(0, 60))}'\n(run sere --help for usage)\n`);
    return EXIT.usage;
  }
  // `sere version`: commander's nearest name is `season`, which is no help to someone asking for the version.
  if (words[0] === 'version') {
    io.stderr(`sere: error: unknown command 'version' — the version is printed by: sere --version\n`);
    return EXIT.usage;
  }
  // Usage errors read like bad-input errors: "sere: error: option '--seed <n>' …" (exit 2).
  const output = { writeOut: (s: string) => io.stdout(s), writeErr: (s: string) => io.stderr(s.startsWith('error:') ? `sere: ${s}` : s) };
  const program = new Command('sere')
    .description('Forecast how the mix of land states changes, from repeated site surveys (fitted Markov chains).')
    .version(TOOL_VERSION)
    .option('--debug', 'print a stack trace for internal errors')
    .exitOverride()
    .configureOutput(output)
    .showHelpAfterError('(run sere --help for usage)');
  for (const register of await commandsFor(argv)) register(program, io);
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
