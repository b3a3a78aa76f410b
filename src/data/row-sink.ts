import type { SereError } from '../errors.js';

/**
 * Where a CSV scanner sends each record: its fields as byte ranges of `bytes` (valid only during
 * the call), and the line the record ends on. The first record is the header.
 */
export interface RowSink {
  row(bytes: Buffer, starts: Int32Array, ends: Int32Array, fields: number, line: number): void;
  /** The table cannot be read as CSV from here on (a NOT_CSV error). */
  notCsv(error: SereError): void;
  /** A hint of how many records the file holds, from the first block: room is made once. */
  expect(records: number): void;
}

export const NOT_CSV_HINT = 'save the survey table as comma-separated values with the same number of fields on every row';
