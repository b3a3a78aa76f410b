import { closeSync, openSync, readSync } from 'node:fs';
import { isUtf8 } from 'node:buffer';
import { createHash } from 'node:crypto';
import { cannotRead, checkRegularFile, firstInvalidUtf8, notText, notUtf8 } from './read-text-file.js';

/**
 * Called with bytes[start, end): whole lines (the last one ends the file, or with a newline).
 * Returns false to stop reading (the caller starts again another way).
 */
export type LineBlockSink = (bytes: Buffer, start: number, end: number, first: boolean) => boolean;

/** Bytes read at a time: a few dozen reads for a table of 10⁷ rows, and little memory. */
const BLOCK = 4 << 20;

/**
 * Read a user's text file synchronously, block by block, with the checks of readTextFile
 * (regular file, no NUL byte anywhere, strict UTF-8) and its SHA-256, holding one block at a
 * time instead of the whole file. Synchronous so that the survey readers stay plain functions:
 * every caller (fit, check, hindcast, season, the tests) reads a table and then works on it.
 *
 * Blocks end at a newline, so a UTF-8 sequence (which never holds byte 0x0A) is never split and
 * checking block by block is checking the file. A NUL byte anywhere outranks bad UTF-8 earlier,
 * as when the whole file was checked at once: after bad UTF-8, reading goes on for NUL bytes only.
 */
export function readLineBlocks(file: string, what: string, sink: LineBlockSink, blockSize = BLOCK): { sha256: string; stopped: boolean } {
  checkRegularFile(file, what);
  let fd: number;
  try {
    fd = openSync(file, 'r');
  } catch {
    throw cannotRead(file, what);
  }
  try {
    const hash = createHash('sha256');
    let bytes = Buffer.allocUnsafe(blockSize);
    let filled = 0;
    let offset = 0;
    let first = true;
    let badUtf8: { byte: number; offset: number } | undefined;
    for (;;) {
      let read: number;
      try {
        read = readSync(fd, bytes, filled, bytes.length - filled, null);
      } catch {
        throw cannotRead(file, what);
      }
      filled += read;
      const end = read === 0 ? filled : bytes.lastIndexOf(0x0a, filled - 1) + 1;
      if (end === 0 && read > 0) {
        // One line longer than the buffer: make room and read on.
        if (filled === bytes.length) bytes = Buffer.concat([bytes, Buffer.allocUnsafe(bytes.length)]);
        continue;
      }
      const block = bytes.subarray(0, end);
      if (block.includes(0)) throw notText(file, what);
      if (badUtf8 === undefined) {
        hash.update(block);
        if (!isUtf8(block)) {
          const at = firstInvalidUtf8(block);
          badUtf8 = { byte: block[at]!, offset: offset + at };
        } else if (!sink(bytes, 0, end, first)) {
          return { sha256: '', stopped: true };
        }
      }
      first = false;
      offset += end;
      bytes.copyWithin(0, end, filled);
      filled -= end;
      if (read === 0) break;
    }
    if (badUtf8) throw notUtf8(file, what, badUtf8.byte, lineAndColumnAt(fd, badUtf8.offset));
    return { sha256: hash.digest('hex'), stopped: false };
  } finally {
    closeSync(fd);
  }
}

/**
 * 1-based line and column (in characters of the valid text before it) of a byte offset: read
 * again from the start, since only an error needs it.
 */
function lineAndColumnAt(fd: number, offset: number): { line: number; column: number } {
  const bytes = Buffer.allocUnsafe(BLOCK);
  let line = 1;
  let lineStart = 0;
  for (let at = 0; at < offset;) {
    const n = readSync(fd, bytes, 0, Math.min(BLOCK, offset - at), at);
    if (n === 0) break;
    for (let i = 0; i < n; i++) if (bytes[i] === 0x0a) { line += 1; lineStart = at + i + 1; }
    at += n;
  }
  const head = Buffer.allocUnsafe(offset - lineStart);
  readSync(fd, head, 0, head.length, lineStart);
  return { line, column: [...head.toString('utf8')].length + 1 };
}
