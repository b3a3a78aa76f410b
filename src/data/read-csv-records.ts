import { parse } from 'csv-parse/sync';
import { SereError } from '../errors.js';

/** One record of a small CSV file, with the line it ends on (csv-parse's `info`). */
export interface CsvRecord {
  readonly record: string[];
  readonly info: { readonly lines: number };
}

/**
 * Every record of a small CSV file held in memory (a counts table, an error matrix): values
 * trimmed, blank lines and a BOM skipped, every row as wide as the header. A file csv-parse
 * cannot read is NOT_CSV naming its line, with `hint` saying what the file should hold.
 */
export function csvRecords(file: string, text: string, hint: string): CsvRecord[] {
  try {
    return parse(text, { info: true, trim: true, skip_empty_lines: true, bom: true, relax_column_count: false }) as never;
  } catch (err) {
    const line = (err as { lines?: number }).lines;
    throw new SereError('NOT_CSV', `not a valid CSV file (${(err as Error).message.split('\n')[0]!.slice(0, 120)})`, { file, ...(line ? { line } : {}) }, hint);
  }
}
