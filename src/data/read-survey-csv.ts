import { statSync } from 'node:fs';
import { SereError, quote, type Place } from '../errors.js';
import { OTHER_SPREADSHEET, readSpreadsheet, WORKBOOK } from './read-spreadsheet.js';
import { readLineBlocks } from './read-line-blocks.js';
import { CsvParseScanner } from './scan-csv-parse.js';
import { PlainCsvScanner } from './scan-plain-csv.js';
import { SurveyCollector } from './survey-collector.js';
import type { LabelMap } from './label-map.js';
import type { SurveyColumns, SurveyLayout, SurveyTable } from './survey.js';

export interface ReadSurveyOptions {
  readonly columns: SurveyColumns;
  /** Declared states, in the user's order; when absent, states are inferred and sorted. */
  readonly states?: readonly string[];
  /** Where `states` was declared (a flag, or a scenario key), for messages; default --states. */
  readonly statesPlace?: Place;
  /** One of several tables read as one (see read-survey-tables.ts): it may hold a single state. */
  readonly partOfSeveral?: boolean;
  /** Long or wide; undefined: detected from the header (survey-layout.ts). */
  readonly layout?: SurveyLayout;
  /** The worksheet of a spreadsheet (.xlsx); undefined: the first. */
  readonly sheet?: string;
  /** Where `sheet` was given (--sheet, or a scenario key), for messages. */
  readonly sheetPlace?: Place;
  /** Recorded labels → states, applied once per distinct label (label-map.ts). */
  readonly labels?: LabelMap;
  /** The time column holds ISO dates (YYYY-MM-DD), rounded to yearly seasons (seasons.ts); otherwise whole numbers. */
  readonly dates?: boolean;
  /** With an error matrix: read a column named `observer` as the observer's when no observer column is named (survey-header.ts). */
  readonly detectObserver?: boolean;
  /** Bytes read at a time (tests set it small, to cross block boundaries everywhere). */
  readonly blockSize?: number;
}

const WHAT = 'survey table';

/**
 * Read a survey table — long (one row per site and survey) or wide (one row per site, one column
 * per survey time), as CSV or as a sheet of an .xlsx workbook — and validate it completely before any
 * counting: every problem is reported with the file, the line and the column, and nothing is
 * written when one is found.
 *
 * The file streams through in blocks (read-line-blocks.ts) and rows go straight into typed arrays
 * (survey-collector.ts): memory grows with the rows kept, 21 bytes each, not with the file's text.
 * A table without quotes is split at byte level (scan-plain-csv.ts); a table with any quote is
 * read again from the start through csv-parse (scan-csv-parse.ts), as it always was.
 */
export function readSurveyCsv(file: string, options: ReadSurveyOptions): SurveyTable {
  if (WORKBOOK.test(file)) return readSurveySheet(file, options);
  if (OTHER_SPREADSHEET.test(file)) {
    throw new SereError('BAD_SPREADSHEET', 'is a spreadsheet format sere does not read', { file },
      'save it from the spreadsheet program as an Excel workbook (.xlsx), or as CSV');
  }
  if (options.sheet !== undefined) {
    throw new SereError('BAD_OPTION', `a sheet (${quote(options.sheet)}) is named, but this survey table is a text (CSV) file, not a workbook`, { file, path: options.sheetPlace?.path },
      'drop --sheet (or fit.sheet), or name the .xlsx workbook');
  }
  const plain = new SurveyCollector(file, options, true);
  const size = fileSize(file);
  const first = readLineBlocks(file, WHAT, new PlainCsvScanner(file, plain, size).block, options.blockSize);
  if (!first.stopped) return plain.table(first.sha256);
  const quoted = new SurveyCollector(file, options, false);
  const scanner = new CsvParseScanner(file, quoted);
  const again = readLineBlocks(file, WHAT, scanner.block, options.blockSize);
  scanner.end();
  return quoted.table(again.sha256);
}

/**
 * A survey table on one sheet of an .xlsx workbook: the same collector, fed the sheet's rows
 * (read-spreadsheet.ts). Its problems are placed on the sheet, so the message names the cell.
 */
function readSurveySheet(file: string, options: ReadSurveyOptions): SurveyTable {
  const collector = new SurveyCollector(file, options, true, 'row');
  let read: { sha256: string; sheet: string } | undefined;
  try {
    read = readSpreadsheet(file, options.sheet, collector, options.sheetPlace);
    return collector.table(read.sha256);
  } catch (err) {
    if (!(err instanceof SereError) || read === undefined || err.place.file !== file || err.place.sheet !== undefined) throw err;
    throw new SereError(err.code, err.message, { ...err.place, sheet: read.sheet }, err.hint);
  }
}

/** For the first block's estimate of the row count; 0 when unknown (readLineBlocks then reports why). */
function fileSize(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}
