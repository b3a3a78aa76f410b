import { statSync } from 'node:fs';
import type { SereError } from '../errors.js';
import { normaliseLabel } from './labels.js';
import { readLineBlocks } from './read-line-blocks.js';
import type { RowSink } from './row-sink.js';
import { CsvParseScanner } from './scan-csv-parse.js';
import { PlainCsvScanner } from './scan-plain-csv.js';
import { columnIndex, type ColumnIndex } from './survey-header.js';
import type { SurveyColumns } from './survey.js';

/** One row of a long survey table, its values trimmed and in NFC as the survey reader takes them. */
export interface SurveyRowText {
  readonly site: string;
  readonly time: string;
  readonly state: string;
  readonly group?: string;
}

export type SurveyRole = keyof SurveyRowText;

export interface FoundLine {
  readonly line: number;
  /** 1-based column of the role asked for. */
  readonly column: number;
}

/** Thrown from the row sink to stop the scan at the first match (caught below, never escapes). */
class Found {
  constructor(readonly at: FoundLine) {}
}

/**
 * The line of the first record of a long survey CSV that `matches` (called in file order; it may
 * keep state, e.g. to find the second of two rows), and the column of `role` in it — for messages
 * about a table counted elsewhere (sql/duckdb-count.ts: DuckDB keeps no line numbers). One
 * streaming pass, the survey reader's own scanners (plain bytes, or csv-parse when the file holds
 * a quote), so its lines are the lines the in-process reader would name; nothing is kept per row.
 * Undefined when no record matches or the file cannot be scanned as the reader scans it.
 */
export function findSurveyLine(file: string, columns: SurveyColumns, role: SurveyRole,
  matches: (row: SurveyRowText, line: number) => boolean): FoundLine | undefined {
  let index: ColumnIndex | undefined;
  const sink: RowSink = {
    row(bytes, starts, ends, fields, line) {
      const text = (n: number | undefined): string => (n === undefined || n >= fields ? '' : normaliseLabel(bytes.toString('utf8', starts[n]!, ends[n]!).trim()));
      if (index === undefined) {
        index = columnIndex(file, Array.from({ length: fields }, (_, n) => bytes.toString('utf8', starts[n]!, ends[n]!)), line, columns);
        return;
      }
      const row = { site: text(index.site), time: text(index.time), state: text(index.state), ...(index.group === undefined ? {} : { group: text(index.group) }) };
      if (matches(row, line)) throw new Found({ line, column: (role === 'group' ? index.group! : index[role]) + 1 });
    },
    notCsv(error: SereError) {
      throw error;
    },
    expect() {},
  };
  try {
    const plain = readLineBlocks(file, 'survey table', new PlainCsvScanner(file, sink, statSync(file).size).block);
    if (plain.stopped) {
      index = undefined;
      const scanner = new CsvParseScanner(file, sink);
      readLineBlocks(file, 'survey table', scanner.block);
      scanner.end();
    }
    return undefined;
  } catch (err) {
    if (err instanceof Found) return err.at;
    // A table DuckDB read but the survey reader's scanners cannot: no line, the message stands.
    return undefined;
  }
}
