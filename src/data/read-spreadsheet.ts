import { MessageChannel, receiveMessageOnPort } from 'node:worker_threads';
import { columnLetters, SereError, quote, type Place } from '../errors.js';
import { startWatched, waitWhile } from '../watched-worker.js';
import { hashFile } from './hash-file.js';
import type { SheetReply } from './sheet-cells.js';
import type { RowSink } from './row-sink.js';

const WHAT = 'survey workbook';

/** File name endings read as workbooks (Office Open XML; .xlsm is the same format with macros, never run). */
export const WORKBOOK = /\.xls[xm]$/i;
/** Spreadsheet formats that are not read: the message says to save as .xlsx or CSV. */
export const OTHER_SPREADSHEET = /\.(xls|xlsb|ods|numbers)$/i;

/**
 * Why a workbook could not be opened, in plain words. An .xlsx file is a zip archive; the zip
 * reader's own messages ("Can't find end of central directory : is this a zip file ? If it is, see
 * https://…") say the file is not one, which is what a user can act on. Other messages keep
 * their first line, without web addresses, cut at 200 characters.
 */
export function unreadableReason(message: string): string {
  if (/central directory|zip file|corrupted zip|end of data/i.test(message)) {
    return 'it is not a complete zip archive, which an .xlsx file is: damaged, cut short, or another format renamed .xlsx';
  }
  const line = message.split('\n')[0]!.replace(/\s*(If it is, )?see https?:\/\/\S+/gi, '').replace(/https?:\/\/\S+/g, '').trim();
  return line.slice(0, 200) || 'unknown reason';
}

/**
 * Read one worksheet of an .xlsx workbook with exceljs (pinned) and hand its rows to a RowSink as
 * a CSV scanner would: the survey collector then validates them exactly as a CSV table's. A row's
 * "line" is its row number in the sheet and a field's column its column, so a message can name
 * the cell (errors.ts prints the place as sheet and A1 cell).
 *
 * exceljs reads only asynchronously and the survey readers are synchronous, so the workbook is
 * read on a worker thread (xlsx-worker.ts) while this thread waits on a shared word
 * (Atomics.wait), then takes the reply with receiveMessageOnPort — no event loop needed. The
 * whole sheet is held in memory (exceljs's reader): workbooks are field-team sized, at most
 * 1,048,576 rows; a table of millions of rows belongs in CSV.
 */
export function readSpreadsheet(file: string, sheet: string | undefined, sink: RowSink, sheetPlace: Place = { path: '--sheet' }): { sha256: string; sheet: string } {
  const sha256 = hashFile(file, WHAT);
  const reply = readOnWorker(file, sheet);
  if (reply.kind === 'unreadable') {
    throw new SereError('BAD_SPREADSHEET', `cannot be read as an .xlsx workbook (${unreadableReason(reply.message)})`, { file },
      'save it from the spreadsheet program as an Excel workbook (.xlsx), or as CSV');
  }
  if (reply.kind === 'no-sheet' && sheet === undefined && reply.sheets.length === 0) {
    // A zip archive with no worksheet in it (another zip renamed .xlsx, or an empty workbook): the file is the problem, not --sheet.
    throw new SereError('BAD_SPREADSHEET', 'cannot be read as an .xlsx workbook (it holds no worksheet)', { file },
      'save it from the spreadsheet program as an Excel workbook (.xlsx), or as CSV');
  }
  if (reply.kind === 'no-sheet') {
    throw new SereError('UNKNOWN_SHEET', sheet === undefined ? 'the workbook has no worksheet'
      : `no sheet ${quote(sheet)} in the workbook (its sheets: ${reply.sheets.map(quote).join(', ')})`,
    { file, path: sheetPlace.path }, sheet === undefined ? 'add a sheet holding the survey table' : 'name one of its sheets with --sheet (or fit.sheet in a scenario)');
  }
  sink.expect(reply.rows.length);
  // The header's last named column sets the width, as a CSV header does: rows are cut or padded to
  // it, and a value beyond it is refused (whose column would it be?).
  const header = reply.rows[0]?.cells ?? [];
  let width = header.length;
  while (width > 0 && header[width - 1]!.trim() === '') width -= 1;
  let bad: SereError | undefined;
  for (const { row, cells } of reply.rows) {
    const beyond = cells.findIndex((cell, c) => c >= width && cell.trim() !== '');
    if (beyond >= 0) {
      bad = new SereError('BAD_CELL', `a value beyond the header's last column (${columnLetters(width)})`,
        { file, sheet: reply.sheet, line: row, column: beyond + 1 }, 'head its column, or delete the value');
      break;
    }
    const fields = Array.from({ length: width }, (_, c) => cells[c] ?? '');
    // Cells joined by NUL, as scan-csv-parse.ts hands on csv-parse's fields.
    const joined = Buffer.from(fields.join('\u0000'));
    const starts = new Int32Array(width);
    const ends = new Int32Array(width);
    let at = 0;
    fields.forEach((cell, n) => {
      starts[n] = at;
      at += Buffer.byteLength(cell);
      ends[n] = at;
      at += 1;
    });
    sink.row(joined, starts, ends, width, row);
  }
  if (!bad && reply.bad) {
    bad = new SereError('BAD_CELL', `the cell holds ${reply.bad.what}`, { file, sheet: reply.sheet, line: reply.bad.row, column: reply.bad.column },
      'type the value (a formula needs its result saved: open and save the workbook in a spreadsheet program)');
  }
  if (bad) sink.notCsv(bad);
  return { sha256, sheet: reply.sheet };
}

/** The worker's reply, waited for on this thread; a worker that dies (out of memory) is WORKER_DIED, not a hang. */
function readOnWorker(file: string, sheet: string | undefined): SheetReply {
  const signal = new Int32Array(new SharedArrayBuffer(4));
  const { port1, port2 } = new MessageChannel();
  const worker = startWatched('xlsx-worker', 'data', import.meta.url, { file, sheet, replyPort: port2, signal }, [port2],
    `reading the workbook ${file}`, 'save the sheet as CSV and read that instead');
  try {
    // The worker always replies (it catches every error of its own) unless it dies; wait until it has.
    waitWhile(signal, 0, 0, [worker]);
    const message = receiveMessageOnPort(port1);
    if (message === undefined) throw new Error('the workbook reader replied with nothing');
    return message.message as SheetReply;
  } finally {
    port1.close();
    worker.terminate();
  }
}
