import { join } from 'node:path';
import ExcelJS from 'exceljs';

/**
 * The spreadsheet fixtures, written by exceljs (never binary files kept without their maker).
 * Invented surveys of invented plots: the same surveys as `surveysCsv`, laid out as a field team
 * might keep them — a long sheet with a formula, a class code and rich text, a wide sheet with a
 * zone column, and sheets that each carry one fault. The tests call it; to look at the workbooks,
 * `npm run build && node dist/scripts/make-workbooks.js FOLDER`.
 */
export const surveysCsv = [
  'plot,zone,year,cover',
  'K1,upper,2019,heath', 'K1,upper,2020,heath', 'K1,upper,2021,scrub', 'K1,upper,2022,scrub',
  'K2,upper,2019,grass', 'K2,upper,2020,heath', 'K2,upper,2022,heath',
  'K3,lower,2019,grass', 'K3,lower,2020,grass', 'K3,lower,2021,grass', 'K3,lower,2022,heath',
  'K4,lower,2020,scrub', 'K4,lower,2021,scrub', 'K4,lower,2022,woodland',
].join('\n') + '\n';

export async function writeWorkbooks(dir: string): Promise<{ surveys: string; faults: string }> {
  const rows = surveysCsv.trim().split('\n').slice(1).map((line) => line.split(','));

  const book = new ExcelJS.Workbook();
  const long = book.addWorksheet('Plots');
  long.addRow(['plot', 'zone', 'year', 'cover']);
  rows.forEach(([plot, zone, year, cover], n) => {
    const row = long.addRow([plot, zone, Number(year), cover]);
    // What a field team's sheet holds besides plain values: a year worked out by a formula (its
    // result saved), woodland recorded as class code 41, a label in rich text, a padded label.
    if (n === 1) row.getCell(3).value = { formula: 'C2+1', result: 2020 };
    if (cover === 'woodland') row.getCell(4).value = 41;
    if (n === 4) row.getCell(4).value = { richText: [{ text: 'gra', font: { bold: true } }, { text: 'ss' }] };
    if (n === 7) row.getCell(1).value = ' K3 ';
  });
  // A blank row at the end, as sheets often have: not a survey.
  long.addRow([]);

  const wide = book.addWorksheet('By year');
  const years = [2019, 2020, 2021, 2022];
  wide.addRow(['plot', 'zone', ...years]);
  for (const plot of ['K1', 'K2', 'K3', 'K4']) {
    const mine = rows.filter((r) => r[0] === plot);
    wide.addRow([plot, mine[0]![1], ...years.map((y) => mine.find((r) => Number(r[2]) === y)?.[3] ?? null)]);
  }
  const notes = book.addWorksheet('Notes');
  notes.addRow(['Invented surveys for sere tests.']);
  const surveys = join(dir, 'surveys.xlsx');
  await book.xlsx.writeFile(surveys);

  const bad = new ExcelJS.Workbook();
  const fault = (name: string, cell: ExcelJS.CellValue): void => {
    const sheet = bad.addWorksheet(name);
    sheet.addRow(['plot', 'year', 'cover']);
    sheet.addRow(['K1', 2019, 'heath']);
    sheet.addRow(['K1', 2020, 'heath']);
    sheet.addRow(['K2', 2019, 'grass']);
    sheet.getCell('B4').value = cell;
  };
  fault('date', new Date(Date.UTC(2019, 5, 1)));
  fault('no result', { formula: 'B2+1' } as ExcelJS.CellValue);
  fault('error', { error: '#N/A' } as ExcelJS.CellValue);
  fault('fraction', 2019.5);
  const beyond = bad.addWorksheet('beyond');
  beyond.addRow(['plot', 'year', 'cover']);
  beyond.addRow(['K1', 2019, 'heath', 'stray']);
  const faults = join(dir, 'faults.xlsx');
  await bad.xlsx.writeFile(faults);
  return { surveys, faults };
}

if (process.argv[1]?.endsWith('make-workbooks.js') && process.argv[2]) {
  void writeWorkbooks(process.argv[2]).then((f) => console.log(`wrote ${f.surveys} and ${f.faults}`));
}
