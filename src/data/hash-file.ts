import { closeSync, openSync, readSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { cannotRead, checkRegularFile } from './read-text-file.js';

const BLOCK = 4 * 1024 * 1024;

/** SHA-256 of a file's bytes, read 4 MiB at a time (a Parquet file or a shard need not fit in memory). */
export function hashFile(file: string, what: string): string {
  checkRegularFile(file, what);
  const hash = createHash('sha256');
  const buffer = Buffer.alloc(BLOCK);
  let fd: number;
  try {
    fd = openSync(file, 'r');
  } catch {
    throw cannotRead(file, what);
  }
  try {
    for (;;) {
      const bytes = readSync(fd, buffer, 0, BLOCK, null);
      if (bytes === 0) break;
      hash.update(buffer.subarray(0, bytes));
    }
  } finally {
    closeSync(fd);
  }
  return hash.digest('hex');
}
