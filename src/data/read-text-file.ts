import { readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { SereError } from '../errors.js';

export interface TextFile {
  readonly file: string;
  readonly text: string;
  readonly sha256: string;
}

/**
 * Read a user's file as UTF-8 text. A missing file, a folder, or a file with NUL bytes (a
 * spreadsheet workbook, an image) gets one clear error instead of a parser's confusion.
 */
export function readTextFile(file: string, what: string): TextFile {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EISDIR') {
      throw new SereError('FILE_NOT_FOUND', `is a folder, not a ${what}`, { file }, `name the ${what} itself`);
    }
    throw new SereError('FILE_NOT_FOUND', `cannot read the ${what}`, { file }, 'check the path and spelling');
  }
  if (bytes.includes(0)) {
    throw new SereError('FILE_NOT_TEXT', `is not a text file (it holds binary data)`, { file },
      `save the ${what} as plain text (for a spreadsheet: "Save as CSV")`);
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return { file, text: bytes.toString('utf8'), sha256 };
}
