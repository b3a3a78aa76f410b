import { readFileSync, statSync, type Stats } from 'node:fs';
import { isUtf8 } from 'node:buffer';
import { createHash } from 'node:crypto';
import { SereError } from '../errors.js';

export interface TextFile {
  readonly file: string;
  readonly text: string;
  readonly sha256: string;
}

/**
 * Read a user's file as UTF-8 text. A missing file, a folder, a device or pipe, a file with NUL
 * bytes (a spreadsheet workbook, an image) or with bytes that are not UTF-8 gets one clear error
 * instead of a parser's confusion — or, for a pipe or /dev/zero, instead of waiting forever.
 */
export function readTextFile(file: string, what: string): TextFile {
  checkRegularFile(file, what);
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch {
    throw cannotRead(file, what);
  }
  if (bytes.includes(0)) throw notText(file, what);
  if (!isUtf8(bytes)) {
    const at = firstInvalidUtf8(bytes);
    throw notUtf8(file, what, bytes[at]!, lineAndColumn(bytes, at));
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return { file, text: bytes.toString('utf8'), sha256 };
}

/** A regular file, or the error that says what it is instead. */
export function checkRegularFile(file: string, what: string): void {
  // stat before opening: opening a FIFO for reading blocks until a writer appears.
  let stats: Stats;
  try {
    stats = statSync(file);
  } catch {
    throw new SereError('FILE_NOT_FOUND', `cannot read the ${what}`, { file }, 'check the path and spelling');
  }
  if (!stats.isFile()) {
    throw new SereError('NOT_A_FILE', `is ${kindOf(stats)}, not a ${what}`, { file }, `name the ${what} itself (a regular file)`);
  }
}

export function cannotRead(file: string, what: string): SereError {
  return new SereError('FILE_NOT_FOUND', `cannot read the ${what}`, { file }, 'check the path and its permissions');
}

/** A file with NUL bytes: a spreadsheet workbook, an image. */
export function notText(file: string, what: string): SereError {
  return new SereError('FILE_NOT_TEXT', `is not a text file (it holds binary data)`, { file },
    `save the ${what} as plain text (for a spreadsheet: "Save as CSV")`);
}

/** Decoding leniently would turn each bad byte into U+FFFD and make 'café' in Latin-1 a new state. */
export function notUtf8(file: string, what: string, byte: number, at: { line: number; column: number }): SereError {
  return new SereError('NOT_UTF8', `holds bytes that are not UTF-8 text (byte 0x${byte.toString(16).padStart(2, '0')})`,
    { file, ...at }, `save the ${what} with UTF-8 encoding (in a spreadsheet: "CSV UTF-8")`);
}

function kindOf(stats: Stats): string {
  if (stats.isDirectory()) return 'a folder';
  if (stats.isFIFO()) return 'a pipe';
  if (stats.isSocket()) return 'a socket';
  if (stats.isCharacterDevice() || stats.isBlockDevice()) return 'a device';
  return 'not a regular file';
}

/** Offset of the first byte that does not start or continue a well-formed UTF-8 sequence. */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  let i = 0;
  while (i < bytes.length) {
    const b = bytes[i]!;
    // Lead byte: sequence length and the allowed range of the second byte (no overlongs, no
    // surrogates, nothing beyond U+10FFFF), per the Unicode Standard's Table 3-7.
    let n: number; let lo = 0x80; let hi = 0xbf;
    if (b < 0x80) { i += 1; continue; }
    else if (b >= 0xc2 && b <= 0xdf) n = 1;
    else if (b >= 0xe0 && b <= 0xef) { n = 2; if (b === 0xe0) lo = 0xa0; if (b === 0xed) hi = 0x9f; }
    else if (b >= 0xf0 && b <= 0xf4) { n = 3; if (b === 0xf0) lo = 0x90; if (b === 0xf4) hi = 0x8f; }
    else return i;
    for (let c = 1; c <= n; c++) {
      const x = bytes[i + c];
      if (x === undefined || x < (c === 1 ? lo : 0x80) || x > (c === 1 ? hi : 0xbf)) return i;
    }
    i += n + 1;
  }
  return -1;
}

/** 1-based line and column (in characters of the valid text before it) of a byte offset. */
export function lineAndColumn(bytes: Buffer, offset: number): { line: number; column: number } {
  const before = bytes.subarray(0, offset);
  const lineStart = before.lastIndexOf(0x0a) + 1;
  let line = 1;
  for (let i = 0; i < lineStart; i++) if (before[i] === 0x0a) line += 1;
  return { line, column: [...before.subarray(lineStart).toString('utf8')].length + 1 };
}
