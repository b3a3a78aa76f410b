import { Parser } from 'csv-parse';
import { SereError } from '../errors.js';
import { NOT_CSV_HINT, type RowSink } from './row-sink.js';

/** The options sere has always read quoted tables with. */
const OPTIONS = { info: true, trim: true, skip_empty_lines: true, bom: true } as const;

/** csv-parse's parser, fed block by block: what its stream (and its sync `parse`) call inside. */
interface CsvParseApi {
  parse(bytes: Buffer | undefined, end: boolean, push: (record: unknown) => void, close: () => void): Error | undefined;
}

/**
 * A table with quotes goes through csv-parse, block by block and synchronously: the `api` of its
 * Parser is the engine its Transform stream and its sync `parse` both drive (csv-parse is pinned,
 * 7.0.3; the tests read quoted tables through it). Records come with the line they end on.
 */
export class CsvParseScanner {
  private readonly api: CsvParseApi;
  private failed = false;

  constructor(private readonly file: string, private readonly sink: RowSink) {
    this.api = (new Parser(OPTIONS) as unknown as { api: CsvParseApi }).api;
  }

  readonly block = (bytes: Buffer, start: number, end: number): boolean => {
    // csv-parse keeps the unfinished end of a block by reference: hand it a copy.
    if (!this.failed) this.fail(this.api.parse(Buffer.from(bytes.subarray(start, end)), false, this.push, () => {}));
    return true;
  };

  /** After the last block. */
  end(): void {
    if (!this.failed) this.fail(this.api.parse(undefined, true, this.push, () => {}));
  }

  private readonly push = (parsed: unknown): void => {
    const { record, info } = parsed as { record: string[]; info: { lines: number } };
    // Fields joined by NUL, which cannot occur in the file (readLineBlocks refuses it).
    const bytes = Buffer.from(record.join('\u0000'));
    const starts = new Int32Array(record.length);
    const ends = new Int32Array(record.length);
    let at = 0;
    record.forEach((field, n) => {
      starts[n] = at;
      at += Buffer.byteLength(field);
      ends[n] = at;
      at += 1;
    });
    this.sink.row(bytes, starts, ends, record.length, info.lines);
  };

  private fail(err: Error | undefined): void {
    if (err === undefined) return;
    this.failed = true;
    const e = err as { lines?: number; message?: string };
    const detail = (e.message ?? 'unreadable').replace(/ on line \d+$| at line \d+$/, '');
    this.sink.notCsv(new SereError('NOT_CSV', `not a readable CSV table: ${detail}`, { file: this.file, line: e.lines }, NOT_CSV_HINT));
  }
}
