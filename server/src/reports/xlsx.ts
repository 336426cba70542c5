import ExcelJS from 'exceljs';
import { tableValues } from './csv';
import { type BatchReport, type ReportTable, shownIn } from './report-model';

/** Excel's limit on a sheet name, and the characters it refuses in one. */
const SHEET_NAME_MAX = 31;
const SHEET_NAME_FORBIDDEN = /[\\/?*[\]:]/g;

function sheetName(title: string, taken: Set<string>): string {
  const base = title.replace(SHEET_NAME_FORBIDDEN, ' ').slice(0, SHEET_NAME_MAX).trim() || 'Sheet';
  let name = base;
  for (let i = 2; taken.has(name.toLowerCase()); i++) name = `${base.slice(0, SHEET_NAME_MAX - 4)} (${i})`;
  taken.add(name.toLowerCase());
  return name;
}

function addTable(workbook: ExcelJS.Workbook, table: ReportTable, taken: Set<string>): void {
  const sheet = workbook.addWorksheet(sheetName(table.title, taken));
  const [header, ...rows] = tableValues(table, 'xlsx');
  sheet.addRow(header).font = { bold: true };
  // Text stays text: exceljs writes strings as strings (never formulas), numbers as numbers.
  for (const row of rows) sheet.addRow(row.map((v) => v ?? null));
  sheet.views = [{ state: 'frozen', ySplit: 1 }];
  sheet.columns.forEach((column, i) => {
    const longest = Math.max(...[header, ...rows].map((r) => String(r[i] ?? '').length));
    column.width = Math.min(60, Math.max(8, longest + 2));
  });
}

/**
 * The batch report as an XLSX workbook: a "Batch" sheet of the details (key, label, value), then one
 * sheet per table of the report, named by its title, its first row the column keys of the CSV.
 */
export async function renderReportXlsx(report: BatchReport): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = 'Equilight';
  const taken = new Set<string>();
  const details = workbook.addWorksheet(sheetName('Batch', taken));
  details.addRow(['key', 'label', 'value']).font = { bold: true };
  for (const section of report.sections)
    for (const d of section.details) if (shownIn(d, 'xlsx')) details.addRow([d.key, d.label, d.value]);
  details.columns = [{ width: 28 }, { width: 26 }, { width: 60 }];
  for (const section of report.sections) {
    if (!shownIn(section, 'xlsx')) continue;
    for (const table of section.tables) if (shownIn(table, 'xlsx')) addTable(workbook, table, taken);
  }
  return Buffer.from(await workbook.xlsx.writeBuffer());
}
