import { accessSync, constants, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { SereError } from '../errors.js';

const LOCK = '.sere-season.lock';

/** A folder sere may write records into: created if missing; a file, or a read-only folder, is refused. */
export function prepareRecordsFolder(recordsDir: string): void {
  let isDirectory = false;
  try {
    isDirectory = statSync(recordsDir).isDirectory();
    if (!isDirectory) {
      throw new SereError('BAD_WORKSPACE', 'the records folder is a file', { file: recordsDir }, "name a folder under 'records' in sere-workspace.yaml");
    }
  } catch (err) {
    if (err instanceof SereError) throw err;
    try {
      mkdirSync(recordsDir, { recursive: true });
    } catch (made) {
      throw writeError(recordsDir, made);
    }
  }
  try {
    accessSync(recordsDir, constants.W_OK);
  } catch (err) {
    throw writeError(recordsDir, err);
  }
}

function writeError(dir: string, err: unknown): SereError {
  const code = (err as NodeJS.ErrnoException).code;
  const readOnly = code === 'EACCES' || code === 'EROFS' || code === 'EPERM';
  return new SereError('CANNOT_WRITE', readOnly ? 'the records folder is read-only' : `cannot create the records folder (${code ?? 'unknown error'})`,
    { file: dir }, readOnly ? 'make it writable, or point records at a writable folder' : 'check the path and the free space');
}

/**
 * Hold the records folder for one season run, so that two runs at once cannot both claim the
 * same previous record: the lock file is created exclusively (O_EXCL) and holds the process id.
 * A lock left by a process that no longer runs is taken over (and said so). While the lock is
 * held, temporary folders left by interrupted runs are removed: no live run can own them.
 */
export function withRecordsLock<T>(recordsDir: string, notice: (line: string) => void, run: () => Promise<T>): Promise<T> {
  const lock = join(recordsDir, LOCK);
  const take = (): void => writeFileSync(lock, `${process.pid} ${new Date().toISOString()}\n`, { flag: 'wx' });
  try {
    take();
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw writeError(recordsDir, err);
    const [pid, since] = readFileSync(lock, 'utf8').trim().split(' ');
    if (alive(Number(pid))) {
      throw new SereError('BUSY', `another sere season (process ${pid}, since ${since ?? '?'}) is writing records here`,
        { file: lock }, 'wait for it to finish; remove the lock file only if that process is gone');
    }
    notice(`${lock}: took over a lock left by process ${pid}, which is no longer running`);
    rmSync(lock, { force: true });
    take();
  }
  const leftovers = readdirSync(recordsDir).filter((n) => n.startsWith('.') && n.endsWith('.tmp'));
  for (const name of leftovers) rmSync(join(recordsDir, name), { recursive: true, force: true });
  if (leftovers.length > 0) {
    notice(`${recordsDir}: removed ${leftovers.length} unfinished record folder${leftovers.length === 1 ? '' : 's'} left by an interrupted run`);
  }
  return run().finally(() => rmSync(lock, { force: true }));
}

function alive(pid: number): boolean {
  if (!Number.isSafeInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}
