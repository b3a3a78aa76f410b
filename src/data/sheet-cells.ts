import type { CellValue, Worksheet } from 'exceljs';

/** What the workbook worker sends back: the sheet's rows as text, or why there are none. */
export type SheetReply =
  | { readonly kind: 'rows'; readonly sheet: string; readonly rows: readonly SheetRow[]; readonly bad?: BadCell }
  | { readonly kind: 'no-sheet'; readonly sheets: readonly string[] }
  | { readonly kind: 'unreadable'; readonly message: string };

/** A row of a sheet: its number (1-based, as the spreadsheet shows it) and its cells as text. */
export interface SheetRow {
  readonly row: number;
  readonly cells: readonly string[];
}

/** The first cell whose value cannot be read as text: the rows stop before it. */
export interface BadCell {
  readonly row: number;
  readonly column: number;
  readonly what: string;
}

/**
 * Every non-empty row of a worksheet, its cells as the text a practitioner sees in them, in row
 * order — up to the first cell that has no such text (`bad`).
 *
 * Decisions (README, "Spreadsheets"): a number is written as JavaScript writes it, so 2019 is
 * '2019' and a class code 41 is '41'; text is kept as typed (rich text joined, a hyperlink's shown
 * text); TRUE/FALSE as those words; a date as its ISO day (2019-06-01, with the time of day when it
 * has one), which a time column then refuses with a hint to write the year — a date is not a
 * survey count; a formula by the result the spreadsheet program saved with it (never recomputed);
 * a formula saved without a result, or an error value (#N/A, #REF!), is refused at its cell.
 */
export function sheetRows(worksheet: Worksheet): { rows: SheetRow[]; bad?: BadCell } {
  const rows: SheetRow[] = [];
  let bad: BadCell | undefined;
  worksheet.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    if (bad) return;
    const cells: string[] = [];
    row.eachCell({ includeEmpty: true }, (cell, column) => {
      if (bad) return;
      const text = cellText(cell.value);
      if (typeof text === 'string') cells[column - 1] = text;
      else bad = { row: rowNumber, column, what: text.bad };
    });
    if (bad) return;
    for (let c = 0; c < cells.length; c++) cells[c] ??= '';
    if (cells.some((c) => c.trim() !== '')) rows.push({ row: rowNumber, cells });
  });
  return bad ? { rows, bad } : { rows };
}

export function cellText(value: CellValue): string | { bad: string } {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return value;
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE';
  if (value instanceof Date) {
    if (Number.isNaN(value.getTime())) return { bad: 'a date the workbook cannot hold' };
    const iso = value.toISOString();
    return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.slice(0, 19);
  }
  if ('error' in value) return { bad: `the error value ${value.error}` };
  if ('formula' in value || 'sharedFormula' in value) {
    const result = (value as { result?: CellValue }).result;
    if (result === undefined || result === null) return { bad: 'a formula saved without its result' };
    return cellText(result);
  }
  if ('richText' in value) return value.richText.map((t) => t.text).join('');
  if ('hyperlink' in value) return cellText(value.text as CellValue);
  return { bad: 'a value that is not a number, text or date' };
}
