import { existsSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { SereError } from '../errors.js';

/**
 * Write a file atomically: to a temporary file beside it, then rename, so that a reader never sees
 * half a file and a failure leaves nothing behind. An existing file is kept unless `force`.
 */
export function writeFileAtomic(file: string, text: string, force: boolean): void {
  refuseExisting([file], force);
  const temporary = join(dirname(file), `.${basename(file)}.${process.pid}.tmp`);
  try {
    writeFileSync(temporary, text);
    renameSync(temporary, file);
  } catch (err) {
    rmSync(temporary, { force: true });
    const reason = (err as NodeJS.ErrnoException).code ?? 'write failed';
    throw new SereError('CANNOT_WRITE', `cannot write the file (${reason})`, { file }, 'check that the folder exists and is writable');
  }
}

/**
 * Refuse before any work when an output file exists and `force` is off, so a run that writes
 * several files (--chart, --csv) never writes some and then stops at another.
 */
export function refuseExisting(files: readonly (string | undefined)[], force: boolean): void {
  if (force) return;
  for (const file of files) {
    if (file !== undefined && existsSync(file)) {
      throw new SereError('FILE_EXISTS', 'already exists and was left untouched', { file },
        'choose another name, or pass --force to replace it');
    }
  }
}

/**
 * Write several files that belong together (a counts table and its sidecar): every one to a
 * temporary file first, then each renamed, so a failure while writing leaves none of them.
 */
export function writeFilesAtomic(files: readonly { file: string; text: string }[], force: boolean): void {
  refuseExisting(files.map((f) => f.file), force);
  const temporary = files.map((f) => join(dirname(f.file), `.${basename(f.file)}.${process.pid}.tmp`));
  try {
    files.forEach((f, n) => writeFileSync(temporary[n]!, f.text));
  } catch (err) {
    for (const t of temporary) rmSync(t, { force: true });
    const reason = (err as NodeJS.ErrnoException).code ?? 'write failed';
    throw new SereError('CANNOT_WRITE', `cannot write the file (${reason})`, { file: files[0]!.file }, 'check that the folder exists and is writable');
  }
  files.forEach((f, n) => renameSync(temporary[n]!, f.file));
}
