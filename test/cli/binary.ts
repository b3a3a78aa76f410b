import { spawnSync } from 'node:child_process';

export interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** Run the built executable (`npm test` builds first), as a user would, without a TTY. */
export function sere(args: string[], env: Record<string, string> = {}, timeoutMs?: number): Run {
  const result = spawnSync(process.execPath, ['dist/cli/sere.mjs', ...args], {
    encoding: 'utf8', ...(timeoutMs ? { timeout: timeoutMs } : {}),
    env: { ...process.env, NO_COLOR: '', ...env },
  });
  return { code: result.status, stdout: result.stdout, stderr: result.stderr };
}
