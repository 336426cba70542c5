import {
  type FontRun,
  SUPERSCRIPT_SCALE,
  type Weight,
  caretSuperscripts,
  fontRuns,
  registerFonts,
} from './fonts';

/** Colours of the report. */
export const INK = '#1b1b1f';
export const MUTED = '#5f6368';
export const ACCENT = '#1565c0';
export const ALERT = '#c62828';

export interface Column {
  header: string;
  width: number;
  align?: 'left' | 'right';
}

/** Page flow for one report: fonts with per-script fallback, headings, key–value lists, tables. */
export class ReportWriter {
  readonly doc: PDFKit.PDFDocument;
  readonly left = 48;
  readonly width: number;
  y: number;
  private readonly bottom: number;

  constructor(doc: PDFKit.PDFDocument) {
    this.doc = doc;
    registerFonts(doc);
    this.width = doc.page.width - 2 * this.left;
    this.bottom = doc.page.height - 56;
    this.y = doc.page.margins.top;
    doc.on('pageAdded', () => {
      this.y = doc.page.margins.top;
    });
  }

  private runs(text: string, weight: Weight): FontRun[] {
    return fontRuns(text, weight);
  }

  /** Draw text at a place, falling back to another Noto Sans subset for characters Latin lacks. */
  text(
    value: string,
    x: number,
    y: number,
    options: PDFKit.Mixins.TextOptions & { weight?: Weight; size?: number; color?: string } = {},
  ): void {
    const { weight = 'regular', size = 9, color = INK, ...rest } = options;
    const doc = this.doc.fontSize(size).fillColor(color);
    let runs = this.runs(value, weight);
    if (runs.some((r) => r.sup)) {
      // Raised runs keep their place only on one line: text that wraps writes exponents as ^-1 instead.
      const oneLine = !value.includes('\n') && (!rest.width || this.lineWidth(runs, size) <= rest.width);
      if (!oneLine && rest.lineBreak !== false) runs = this.runs(caretSuperscripts(value), weight);
    }
    if (runs.length > 1 && rest.lineBreak === false && rest.width && rest.align && rest.align !== 'left') {
      // pdfkit aligns each continued run on its own: place the runs of one line by hand instead.
      const sized = (sup: boolean) => doc.fontSize(sup ? size * SUPERSCRIPT_SCALE : size);
      const widths = runs.map((run) => sized(run.sup).font(run.font).widthOfString(run.text));
      const total = widths.reduce((sum, w) => sum + w, 0);
      let cx = rest.align === 'right' ? x + rest.width - total : x + (rest.width - total) / 2;
      runs.forEach((run, i) => {
        sized(run.sup).font(run.font).text(run.text, cx, y, { lineBreak: false });
        cx += widths[i];
      });
      doc.fontSize(size);
      return;
    }
    runs.forEach((run, i) => {
      doc.font(run.font).fontSize(run.sup ? size * SUPERSCRIPT_SCALE : size);
      const continued = i < runs.length - 1;
      if (i === 0) doc.text(run.text, x, y, { ...rest, continued });
      else doc.text(run.text, { ...rest, continued });
    });
    doc.fontSize(size);
  }

  /** Width of runs drawn on one line. */
  private lineWidth(runs: readonly FontRun[], size: number): number {
    return runs.reduce(
      (sum, run) =>
        sum +
        this.doc
          .font(run.font)
          .fontSize(run.sup ? size * SUPERSCRIPT_SCALE : size)
          .widthOfString(run.text),
      0,
    );
  }

  /** Height of wrapped text (measured in the Latin font). */
  heightOf(value: string, width: number, size = 9, weight: Weight = 'regular'): number {
    return this.doc.font(`${weight}-latin`).fontSize(size).heightOfString(value, { width });
  }

  private readonly widths = new Map<string, number>();

  /** Width of one line of text as `text()` draws it (measured once per text, size and weight). */
  widthOf(value: string, size = 9, weight: Weight = 'regular'): number {
    const key = `${weight}|${size}|${value}`;
    let width = this.widths.get(key);
    if (width === undefined) {
      width = this.lineWidth(this.runs(value, weight), size);
      this.widths.set(key, width);
    }
    return width;
  }

  ensure(height: number): void {
    if (this.y + height > this.bottom) this.doc.addPage();
  }

  /** A section title, kept on one page with at least `keepWith` points of what follows. */
  heading(title: string, keepWith = 40): void {
    this.ensure(28 + keepWith);
    this.y += 10;
    this.text(title, this.left, this.y, { weight: 'bold', size: 12, color: ACCENT });
    this.y += 18;
  }

  /** A table's own title within a section. */
  subheading(title: string): void {
    this.ensure(14 + 30);
    this.y += 4;
    this.text(title, this.left, this.y, { weight: 'bold', size: 9.5, color: INK });
    this.y += 14;
  }

  paragraph(value: string, options: { size?: number; color?: string; weight?: Weight } = {}): void {
    const size = options.size ?? 9;
    const height = this.heightOf(value, this.width, size, options.weight);
    this.ensure(height + 4);
    this.text(value, this.left, this.y, { width: this.width, ...options, size });
    this.y += height + 4;
  }

  keyValues(pairs: [string, string][]): void {
    const keyWidth = 140;
    for (const [key, value] of pairs) {
      const height = Math.max(12, this.heightOf(value, this.width - keyWidth, 9));
      this.ensure(height + 2);
      this.text(key, this.left, this.y, { width: keyWidth - 8, color: MUTED });
      this.text(value, this.left + keyWidth, this.y, { width: this.width - keyWidth });
      this.y += height + 2;
    }
  }

  /**
   * A table. A cell that fits its column stays on one line (numbers keep raised exponents); one that
   * does not wraps, header cells too, and its row grows: no cell runs into the next column.
   */
  table(columns: Column[], rows: string[][], empty = 'None.'): void {
    const size = 7.5;
    const minRow = 13;
    const total = columns.reduce((sum, c) => sum + c.width, 0);
    const scale = total > this.width ? this.width / total : 1;
    const widths = columns.map((c) => c.width * scale);
    // No glyph of Noto Sans is wider than 1.1 em: a short cell fits without measuring it.
    const fits = (cell: string, i: number, weight: Weight): boolean =>
      [...cell].length * size * 1.1 <= widths[i] - 4 || this.widthOf(cell, size, weight) <= widths[i] - 4;
    const drawRow = (cells: string[], header: boolean): void => {
      const weight: Weight = header ? 'bold' : 'regular';
      const single = cells.map((cell, i) => !cell.includes('\n') && fits(cell, i, weight));
      const height = Math.max(
        minRow,
        ...cells.map((cell, i) =>
          single[i] ? minRow : this.heightOf(caretSuperscripts(cell), widths[i] - 4, size, weight) + 4,
        ),
      );
      if (this.y + height > this.bottom) {
        this.doc.addPage();
        if (!header)
          drawRow(
            columns.map((c) => c.header),
            true,
          );
      }
      if (header) this.doc.rect(this.left, this.y - 2, this.width, height).fill('#eceff1');
      let x = this.left;
      cells.forEach((cell, i) => {
        this.text(single[i] ? cell : caretSuperscripts(cell), x + 2, this.y, {
          width: widths[i] - 4,
          weight,
          size,
          align: columns[i].align ?? 'left',
          ...(single[i] ? { lineBreak: false } : {}),
        });
        x += widths[i];
      });
      if (!header)
        this.doc
          .moveTo(this.left, this.y + height - 3)
          .lineTo(this.left + this.width, this.y + height - 3)
          .lineWidth(0.3)
          .strokeColor('#cfd8dc')
          .stroke();
      this.y += height;
    };
    this.ensure(minRow * 2);
    drawRow(
      columns.map((c) => c.header),
      true,
    );
    if (!rows.length) {
      this.text(empty, this.left + 2, this.y, { size: 8, color: MUTED });
      this.y += minRow;
      return;
    }
    for (const row of rows)
      drawRow(
        columns.map((_, i) => row[i] ?? ''),
        false,
      );
    this.y += 4;
  }
}
