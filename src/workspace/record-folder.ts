import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { SereError } from '../errors.js';

/** A record's name: the date, then -2, -3 … for further runs the same day. Never an existing name. */
export function freeRecordName(recordsDir: string, date: string): string {
  if (!existsSync(join(recordsDir, date))) return date;
  for (let n = 2; ; n++) if (!existsSync(join(recordsDir, `${date}-${n}`))) return `${date}-${n}`;
}

/** Earlier records, oldest first: folders holding a manifest (temporary folders start with a dot). */
export function listRecords(recordsDir: string): string[] {
  if (!existsSync(recordsDir)) return [];
  return readdirSync(recordsDir, { withFileTypes: true })
    .filter((e) => e.isDirectory() && !e.name.startsWith('.') && existsSync(join(recordsDir, e.name, 'manifest.json')))
    .map((e) => e.name)
    .sort(compareRecordNames);
}

/** 2026-12-01 < 2026-12-01-2 < 2026-12-01-10 < 2026-12-02. */
function compareRecordNames(a: string, b: string): number {
  const key = (s: string): [string, number] => { const m = /^(.*?)(?:-(\d+))?$/.exec(s)!; return [m[2] ? m[1]! : s, m[2] ? Number(m[2]) : 1]; };
  const [da, na] = key(a);
  const [db, nb] = key(b);
  return da < db ? -1 : da > db ? 1 : na - nb;
}

/**
 * Write a whole folder atomically: every file goes into a temporary folder beside the target,
 * which is renamed into place only when all are written. A failure part-way removes the temporary
 * folder, so there is never a partial record, and an existing folder is never replaced.
 * `write` is injectable so tests can fail mid-way.
 */
export function writeFolderAtomic(target: string, files: ReadonlyMap<string, string | Buffer>,
  write: (path: string, data: string | Buffer) => void = writeFileSync): void {
  if (existsSync(target)) {
    throw new SereError('FILE_EXISTS', 'already exists and was left untouched', { file: target }, 'records are never overwritten');
  }
  const temporary = join(dirname(target), `.${Date.now().toString(36)}-${process.pid}.tmp`);
  try {
    mkdirSync(temporary, { recursive: true });
    for (const [path, data] of files) {
      mkdirSync(dirname(join(temporary, path)), { recursive: true });
      write(join(temporary, path), data);
    }
    renameSync(temporary, target);
  } catch (err) {
    rmSync(temporary, { recursive: true, force: true });
    if (err instanceof SereError) throw err;
    throw new SereError('CANNOT_WRITE', `cannot write the record (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`,
      { file: target }, 'check that the records folder is writable and has space; earlier records are untouched');
  }
}
