import { workerData } from 'node:worker_threads';
import type { MessagePort } from 'node:worker_threads';
import { sheetRows, type SheetReply } from './sheet-cells.js';

/**
 * Reads a workbook on a worker thread, for read-spreadsheet.ts: exceljs reads only asynchronously,
 * and the survey readers are synchronous (every caller reads a table, then works on it). The reply
 * goes on the port, then the shared word is set and the waiting thread woken.
 */
const { file, sheet, replyPort: port, signal } = workerData as { file: string; sheet?: string; replyPort: MessagePort; signal: Int32Array };

function reply(message: SheetReply): void {
  port.postMessage(message);
  Atomics.store(signal, 0, 1);
  Atomics.notify(signal, 0);
}

try {
  // Loaded inside the try: a library that fails to load must still get a reply to the waiting thread.
  const ExcelJS = (await import('exceljs')).default;
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.readFile(file);
  const sheets = workbook.worksheets.map((w) => w.name);
  const worksheet = sheet === undefined ? workbook.worksheets[0] : workbook.worksheets.find((w) => w.name === sheet);
  reply(worksheet === undefined ? { kind: 'no-sheet', sheets } : { kind: 'rows', sheet: worksheet.name, ...sheetRows(worksheet) });
} catch (err) {
  reply({ kind: 'unreadable', message: err instanceof Error ? err.message : String(err) });
}
