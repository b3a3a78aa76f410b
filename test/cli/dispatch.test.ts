import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

// The dispatcher (cli/run.ts) loads only the command a run names: every command must still be
// reachable by its name, listed by --help in its place, and usage errors must read as before.
const COMMANDS = ['fit', 'forecast', 'compare', 'check', 'init', 'season', 'hindcast', 'effort', 'count'];

describe('sere command dispatch (built binary)', () => {
  it('--version prints the package version and loads no command', () => {
    const version = (JSON.parse(readFileSync('package.json', 'utf8')) as { version: string }).version;
    for (const flag of ['--version', '-V']) {
      const r = sere([flag]);
      expect(r.code).toBe(0);
      expect(r.stdout.trim()).toBe(version);
    }
  });

  it('--help lists every command, in order', () => {
    const r = sere(['--help']);
    expect(r.code).toBe(0);
    const listed = r.stdout.split('\n').map((line) => /^ {2}([a-z]+)\b/.exec(line)?.[1]).filter((name) => name !== undefined && name !== 'help');
    expect(listed).toEqual(COMMANDS);
  });

  it('each command is found by its name, after the program options too', () => {
    for (const name of COMMANDS) {
      const r = sere([name, '--help']);
      expect(r.code, name).toBe(0);
      expect(r.stdout, name).toContain(`Usage: sere ${name} `);
    }
    expect(sere(['help', 'forecast']).stdout).toContain('Usage: sere forecast ');
    const debug = sere(['--debug', 'forecast', 'no-such-scenario.yaml']);
    expect(debug.code).toBe(1);
    expect(debug.stderr).toMatch(/^sere: error \[FILE_NOT_FOUND\]/);
  });

  it('an unknown command, or none, is a usage error (exit 2)', () => {
    expect(sere(['forcast', 'x.yaml']).code).toBe(2);
    expect(sere(['--debug']).code).toBe(2);
    expect(sere(['--bogus']).code).toBe(2);
    // help for a name that is no command says so in one line (it printed the whole usage).
    const help = sere(['help', 'frobnicate']);
    expect(help.code).toBe(2);
    expect(help.stderr.split('\n').filter(Boolean)).toHaveLength(2);
    expect(help.stdout).toBe('');
    // `sere version` names the flag that prints it (commander suggested `season`).
    const version = sere(['version']);
    expect(version.code).toBe(2);
    expect(version.stderr).toContain('sere --version');
    expect(version.stderr).not.toContain('season');
  });
});
