import ExcelJS from 'exceljs';
import { ParseError } from '../parsers';
import { describeCellOutOfRange, inspectWorkbookArchive, scanWorksheetCells } from './xlsx-limits';

function csvCell(text: string): string {
  return /[",\n\r]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

function cellText(value: ExcelJS.CellValue, file: string, address: string): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number' || typeof value === 'boolean') return String(value);
  if (typeof value === 'string') return value;
  if (value instanceof Date) return value.toISOString();
  if (typeof value === 'object' && 'formula' in value) {
    throw new ParseError({
      file,
      detail: `cell ${address} holds a formula: expected plain values (formulas are never evaluated)`,
    });
  }
  if (typeof value === 'object' && 'richText' in value) return value.richText.map((r) => r.text).join('');
  if (typeof value === 'object' && 'text' in value) return String(value.text);
  return String(value);
}

/**
 * The first worksheet of an XLSX manifest as CSV text, so the one manifest parser checks both.
 * Spreadsheet row n becomes line n, so problems point at the row a person sees.
 * The archive's sizes and the sheet's cells are checked against the manifest limits first
 * (`xlsx-limits.ts`), and only the range that holds values is read.
 */
export async function xlsxToCsv(content: Buffer, file: string): Promise<Buffer> {
  scanWorksheetCells(await inspectWorkbookArchive(content, file), file);
  const workbook = new ExcelJS.Workbook();
  try {
    await workbook.xlsx.load(content as unknown as ArrayBuffer);
  } catch {
    throw new ParseError({ file, detail: 'the file is not a readable XLSX workbook' });
  }
  const sheet = workbook.worksheets[0];
  // The used range: rows and columns that hold a value (formatting alone does not count).
  const filled = new Map<number, ExcelJS.Row>();
  let lastRow = 0;
  let width = 0;
  sheet?.eachRow({ includeEmpty: false }, (row, r) => {
    row.eachCell({ includeEmpty: false }, (cell, c) => {
      const problem = describeCellOutOfRange(r, c);
      if (problem) throw new ParseError({ file, detail: problem });
      width = Math.max(width, c);
    });
    filled.set(r, row);
    lastRow = Math.max(lastRow, r);
  });
  if (lastRow === 0) throw new ParseError({ file, detail: 'the workbook has no rows: no samples' });
  const lines: string[] = [];
  let headerLength = 0;
  for (let r = 1; r <= lastRow; r++) {
    const row = filled.get(r);
    const cells: string[] = [];
    for (let c = 1; row && c <= width; c++)
      cells.push(csvCell(cellText(row.getCell(c).value, file, row.getCell(c).address)));
    // Empty cells past the header are the sheet's width, not the row's: drop them, so a row that is too
    // long stays visible while a short row (empty trailing cells) is simply complete.
    while (cells.length > Math.max(headerLength, 1) && cells[cells.length - 1] === '') cells.pop();
    if (r === 1) headerLength = cells.length;
    lines.push(cells.join(','));
  }
  return Buffer.from(`${lines.join('\n')}\n`, 'utf8');
}
