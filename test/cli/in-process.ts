import { run } from '../../src/cli/run.js';
import type { Io } from '../../src/cli/io.js';

export interface Outcome { code: number; stdout: string; stderr: string }

/** The CLI as a function, its output captured (faster than spawning the built binary). */
export async function sereInProcess(args: string[]): Promise<Outcome> {
  let stdout = '';
  let stderr = '';
  const io: Io = { stdout: (t) => { stdout += t; }, stderr: (t) => { stderr += t; }, color: false, progress: false };
  const code = await run(args, io);
  return { code, stdout, stderr };
}
