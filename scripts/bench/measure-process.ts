import { spawnSync } from 'node:child_process';
import { performance } from 'node:perf_hooks';

export interface Run { readonly seconds: number; readonly cpu: number; readonly peakMb: number; readonly stdout: string }

/** One whole process under /usr/bin/time -v: wall seconds, CPU seconds (user + system), peak RSS. */
export function measure(command: string, args: readonly string[]): Run {
  const start = performance.now();
  const r = spawnSync('/usr/bin/time', ['-v', command, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const seconds = (performance.now() - start) / 1000;
  if (r.status !== 0) throw new Error(`${command} ${args.join(' ')} failed:\n${r.stderr}`);
  const field = (name: string): number => Number(new RegExp(`${name}: ([\\d.]+)`).exec(r.stderr)?.[1] ?? Number.NaN);
  return { seconds, cpu: field('User time \\(seconds\\)') + field('System time \\(seconds\\)'), peakMb: field('Maximum resident set size \\(kbytes\\)') / 1024, stdout: r.stdout };
}

/** Whether python3 with numpy is here: the side-by-side benches run only then. */
export const numpyAvailable = (): boolean => spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;
