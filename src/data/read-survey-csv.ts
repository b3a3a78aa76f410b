import { statSync } from 'node:fs';
import type { Place } from '../errors.js';
import { readLineBlocks } from './read-line-blocks.js';
import { CsvParseScanner } from './scan-csv-parse.js';
import { PlainCsvScanner } from './scan-plain-csv.js';
import { SurveyCollector } from './survey-collector.js';
import type { SurveyColumns, SurveyTable } from './survey.js';

export interface ReadSurveyOptions {
  readonly columns: SurveyColumns;
  /** Declared states, in the user's order; when absent, states are inferred and sorted. */
  readonly states?: readonly string[];
  /** Where `states` was declared (a flag, or a scenario key), for messages; default --states. */
  readonly statesPlace?: Place;
  /** One of several tables read as one (see read-survey-tables.ts): it may hold a single state. */
  readonly partOfSeveral?: boolean;
  /** The time column holds ISO dates (YYYY-MM-DD), rounded to yearly seasons (seasons.ts); otherwise whole numbers. */
  readonly dates?: boolean;
  /** Bytes read at a time (tests set it small, to cross block boundaries everywhere). */
  readonly blockSize?: number;
}

const WHAT = 'survey table';

/**
 * Read a long survey table (one row per site and survey) and validate it completely before any
 * counting: every problem is reported with the file, the line and the column, and nothing is
 * written when one is found.
 *
 * The file streams through in blocks (read-line-blocks.ts) and rows go straight into typed arrays
 * (survey-collector.ts): memory grows with the rows kept, 21 bytes each, not with the file's text.
 * A table without quotes is split at byte level (scan-plain-csv.ts); a table with any quote is
 * read again from the start through csv-parse (scan-csv-parse.ts), as it always was.
 */
export function readSurveyCsv(file: string, options: ReadSurveyOptions): SurveyTable {
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

/** For the first block's estimate of the row count; 0 when unknown (readLineBlocks then reports why). */
function fileSize(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}
