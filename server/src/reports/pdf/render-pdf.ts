import PDFDocument from 'pdfkit';
import { type BatchReport, type ReportFigure, type ReportTable, shownIn } from '../report-model';
import { drawCalibrationPlot, drawJobPlot, drawLayoutMap } from './plots';
import { type Column, MUTED, ReportWriter } from './pdf-writer';

export interface PdfOptions {
  /** Deflate the page streams (default). Off makes the PDF's text searchable with a plain text search. */
  compress?: boolean;
}

/** Room a figure needs below its heading, so a heading never ends a page alone. */
function figureHeight(figure: ReportFigure): number {
  return figure.kind === 'calibration' ? 300 : figure.kind === 'job' ? 200 : 120;
}

function drawFigure(w: ReportWriter, figure: ReportFigure): void {
  if (figure.kind === 'layout-map') drawLayoutMap(w, figure.positions, figure.roles);
  else if (figure.kind === 'calibration') drawCalibrationPlot(w, figure.calibration);
  else drawJobPlot(w, figure.job, figure.mixtures);
}

/** A table as the page shows it: the PDF's columns, a header with its unit where that fits. */
function drawTable(w: ReportWriter, table: ReportTable): void {
  const shown = table.columns.map((c, i) => ({ c, i })).filter(({ c }) => shownIn(c, 'pdf'));
  if (table.pdfLayout === 'quantities') {
    // One line per quantity: a one-row table read down rather than across.
    const row = table.rows[0] ?? [];
    w.table(
      [
        { header: 'Quantity', width: 170 },
        { header: 'Value', width: 180, align: 'right' },
        { header: 'Unit', width: 149 },
      ],
      shown.map(({ c, i }) => [c.header, row[i]?.text ?? '', c.unit ?? '']),
      table.empty,
    );
    return;
  }
  const total = shown.reduce((sum, { c }) => sum + c.width, 0);
  const scale = total > w.width ? w.width / total : 1;
  const columns: Column[] = shown.map(({ c }) => {
    const withUnit = c.unit ? `${c.header} (${c.unit})` : c.header;
    const fits = w.widthOf(withUnit, 7.5, 'bold') <= c.width * scale - 4;
    return { header: fits ? withUnit : c.header, width: c.width, align: c.align };
  });
  w.table(
    columns,
    table.rows.map((row) => shown.map(({ i }) => row[i]?.text ?? '')),
    table.empty,
  );
}

/** The batch report as a PDF: every part of the report model the PDF shows, in order, with page numbers. */
export function renderReportPdf(report: BatchReport, options: PdfOptions = {}): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: 48, bottom: 40, left: 48, right: 48 },
    compress: options.compress ?? true,
    bufferPages: true,
    info: { Title: report.title, Author: 'Equilight' },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const w = new ReportWriter(doc);

  w.text(report.title, w.left, w.y, { weight: 'bold', size: 17, width: w.width });
  w.y += w.heightOf(report.title, w.width, 17, 'bold') + 2;
  w.paragraph(report.subtitle, { color: MUTED, size: 8.5 });

  if (report.verdict) {
    w.y += 4;
    const { text: verdict, kLine } = report.verdict;
    const verdictHeight = w.heightOf(verdict, w.width - 16, 10, 'bold');
    const h = verdictHeight + (kLine ? 14 : 0) + 12;
    w.ensure(h + 6);
    doc.rect(w.left, w.y, w.width, h).fillColor('#e3f2fd').fill();
    const boxStyle = { width: w.width - 16, weight: 'bold' as const, size: 10, color: '#0d47a1' };
    w.text(verdict, w.left + 8, w.y + 6, boxStyle);
    if (kLine) w.text(kLine, w.left + 8, w.y + 6 + verdictHeight + 2, boxStyle);
    w.y += h + 6;
  }

  for (const section of report.sections) {
    if (!shownIn(section, 'pdf')) continue;
    const tables = section.tables.filter((t) => shownIn(t, 'pdf'));
    const details = section.details.filter((d) => shownIn(d, 'pdf'));
    const notes = section.notes.filter((n) => shownIn(n, 'pdf'));
    if (!tables.length && !details.length && !notes.length && !section.figures.length) continue;
    w.heading(section.title, section.figures.length ? figureHeight(section.figures[0]) : 40);
    if (details.length) w.keyValues(details.map((d) => [d.label, d.text]));
    for (const figure of section.figures) drawFigure(w, figure);
    for (const table of tables) {
      if (table.title !== section.title) w.subheading(table.title);
      drawTable(w, table);
    }
    for (const note of notes)
      w.paragraph(note.text, {
        ...(note.style === 'emphasis' ? { weight: 'bold' as const } : {}),
        ...(note.style === 'muted' ? { color: MUTED } : {}),
      });
  }

  // Page numbers.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottomMargin = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    w.text(`${report.footer} · page ${i + 1} of ${range.count}`, w.left, doc.page.height - 30, {
      width: w.width,
      align: 'right',
      size: 7,
      color: MUTED,
      lineBreak: false,
    });
    doc.page.margins.bottom = bottomMargin;
  }
  doc.end();
  return done;
}
