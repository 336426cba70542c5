import path from 'node:path';
import PDFDocument from 'pdfkit';
import type { CalibrationResult, PositionResult } from '../analysis';
import type { AuditDto } from '../audit/audit.service';
import type { BatchAnalysisDto } from '../batches/batches.service';
import {
  EPSILON_UNIT,
  formatKValue,
  formatNumber,
  formatQuantity,
  kUnitOf as kPdfUnit,
} from '../analysis/number-format';
import { loadWoffFont } from './woff';

export interface BatchReportInput {
  analysis: BatchAnalysisDto;
  /** Audit entries of the batch, oldest first. */
  trail: AuditDto[];
  generatedAt?: Date;
}

export interface PdfOptions {
  /** Deflate the page streams (default). Off makes the PDF's text searchable with a plain text search. */
  compress?: boolean;
}

const FONT_DIR = path.join(path.dirname(require.resolve('@fontsource/noto-sans/package.json')), 'files');

/** The Noto Sans subsets shipped with the app, and the characters each one covers. */
const SUBSETS = [
  { name: 'greek', covers: (cp: number) => cp >= 0x370 && cp <= 0x3ff },
  {
    name: 'latin-ext',
    covers: (cp: number) => (cp >= 0x100 && cp <= 0x24f && cp !== 0x131) || (cp >= 0x1e00 && cp <= 0x1eff),
  },
  { name: 'cyrillic', covers: (cp: number) => cp >= 0x400 && cp <= 0x4ff },
] as const;

type Weight = 'regular' | 'bold';

/** Stand-ins for symbols that none of the shipped subsets draws. */
const REPLACEMENTS: Record<string, string> = {
  '→': '->',
  '←': '<-',
  '≥': '>=',
  '≤': '<=',
  '≈': '~',
  '✓': 'yes',
  '✕': 'x',
};
const SUBSCRIPT_DIGITS = '₀₁₂₃₄₅₆₇₈₉';
const SUPERSCRIPT_DIGITS = '⁰¹²³⁴⁵⁶⁷⁸⁹';

function plainer(text: string): string {
  return text.replace(/[→←≥≤≈✓✕₀-₉]/g, (c) => {
    if (REPLACEMENTS[c]) return REPLACEMENTS[c];
    const sub = SUBSCRIPT_DIGITS.indexOf(c);
    return sub >= 0 ? String(sub) : c;
  });
}

/** A superscript character (exponents and units such as 10⁻⁶, L·mol⁻¹) as the ordinary one it raises. */
function superscriptBase(c: string): string | null {
  if (c === '⁻') return '−';
  const digit = SUPERSCRIPT_DIGITS.indexOf(c);
  return digit >= 0 ? String(digit) : null;
}

/** Superscripts as plain text for wrapped paragraphs: "L·mol⁻¹" → "L·mol^-1", "10⁻⁶" → "10^-6". */
function caretSuperscripts(text: string): string {
  return text.replace(
    /[⁻⁰¹²³⁴-⁹]+/g,
    (run) => `^${[...run].map((c) => (c === '⁻' ? '-' : superscriptBase(c))).join('')}`,
  );
}

/** Superscripts are drawn smaller and top-aligned (pdfkit places a run's top at the line's top). */
const SUPERSCRIPT_SCALE = 0.68;

const ROLE_COLOURS: Record<string, string> = {
  blank: '#cfd8dc',
  standard: '#90caf9',
  unknown: '#ffcc80',
  mixture: '#a5d6a7',
  control: '#ce93d8',
};
const ROLE_LETTERS: Record<string, string> = {
  blank: 'B',
  standard: 'S',
  unknown: 'U',
  mixture: 'M',
  control: 'C',
};

const INK = '#1b1b1f';
const MUTED = '#5f6368';
const ACCENT = '#1565c0';
const ALERT = '#c62828';

interface Column {
  header: string;
  width: number;
  align?: 'left' | 'right';
}

/** Page flow for one report: fonts with per-script fallback, headings, key–value lists, tables. */
class ReportWriter {
  readonly doc: PDFKit.PDFDocument;
  readonly left = 48;
  readonly width: number;
  y: number;
  private readonly bottom: number;

  constructor(doc: PDFKit.PDFDocument) {
    this.doc = doc;
    for (const weight of ['regular', 'bold'] as const) {
      const number = weight === 'bold' ? 700 : 400;
      for (const subset of ['latin', ...SUBSETS.map((s) => s.name)])
        doc.registerFont(
          `${weight}-${subset}`,
          loadWoffFont(path.join(FONT_DIR, `noto-sans-${subset}-${number}-normal.woff`)),
        );
    }
    this.width = doc.page.width - 2 * this.left;
    this.bottom = doc.page.height - 56;
    this.y = doc.page.margins.top;
    doc.on('pageAdded', () => {
      this.y = doc.page.margins.top;
    });
  }

  /** Split text into runs that one font subset can draw. */
  private runs(text: string, weight: Weight): { font: string; text: string; sup: boolean }[] {
    const runs: { font: string; text: string; sup: boolean }[] = [];
    for (const raw of plainer(text)) {
      const base = superscriptBase(raw);
      const ch = base ?? raw;
      const sup = base !== null;
      const cp = ch.codePointAt(0)!;
      const subset = SUBSETS.find((s) => s.covers(cp));
      const font = `${weight}-${subset ? subset.name : 'latin'}`;
      const last = runs.at(-1);
      if (last && last.font === font && last.sup === sup) last.text += ch;
      else runs.push({ font, text: ch, sup });
    }
    return runs.length ? runs : [{ font: `${weight}-latin`, text: '', sup: false }];
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
  private lineWidth(runs: readonly { font: string; text: string; sup: boolean }[], size: number): number {
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

  /** A table whose left-aligned cells wrap (the row grows) and right-aligned cells stay on one line. */
  table(columns: Column[], rows: string[][], empty = 'None.'): void {
    const size = 7.5;
    const minRow = 13;
    const total = columns.reduce((sum, c) => sum + c.width, 0);
    const scale = total > this.width ? this.width / total : 1;
    const widths = columns.map((c) => c.width * scale);
    const drawRow = (cells: string[], header: boolean): void => {
      const height = Math.max(
        minRow,
        ...cells.map((cell, i) =>
          columns[i].align === 'right' || header ? minRow : this.heightOf(cell, widths[i] - 4, size) + 4,
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
        const single = header || columns[i].align === 'right';
        this.text(cell, x + 2, this.y, {
          width: widths[i] - 4,
          weight: header ? 'bold' : 'regular',
          size,
          align: columns[i].align ?? 'left',
          ...(single ? { lineBreak: false, height: minRow, ellipsis: true } : {}),
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

function withSe(value: number | null | undefined, se: number | null | undefined): string {
  if (value === null || value === undefined) return '—';
  return se === null || se === undefined
    ? formatNumber(value)
    : `${formatNumber(value)} ± ${formatNumber(se, 2)}`;
}

function percent(value: number | null | undefined): string {
  return value === null || value === undefined ? '—' : `${(value * 100).toFixed(1)} %`;
}

/** A concentration unit that keeps the numbers of a plot readable. */
function concentrationScale(maxM: number): { factor: number; unit: string } {
  if (maxM > 0 && maxM < 1e-3) return { factor: 1e6, unit: 'µM' };
  if (maxM > 0 && maxM < 1) return { factor: 1e3, unit: 'mM' };
  return { factor: 1, unit: 'M' };
}

/** About five round tick values covering [lo, hi]. */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * magnitude).find((s) => s >= raw) ?? raw;
  const ticks: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step)
    ticks.push(Number(t.toPrecision(12)));
  return ticks;
}

function drawLayoutMap(w: ReportWriter, a: BatchAnalysisDto): void {
  const doc = w.doc;
  const results = new Map<string, PositionResult>(a.result.positions.map((p) => [p.position, p]));
  const roles = new Map(a.layoutPositions.map((p) => [p.position, p.role]));
  for (const p of a.result.positions) if (p.role && !roles.has(p.position)) roles.set(p.position, p.role);
  const all = [...roles.keys(), ...results.keys()];
  const cuvettes = all.length > 0 && all.every((p) => /^C\d+$/.test(p));
  let cells: { label: string; position: string; col: number; row: number }[];
  let cols: number;
  let rows: number;
  let rowLabels: string[] = [];
  if (cuvettes) {
    const numbers = [...new Set(all.map((p) => Number(p.slice(1))))].sort((x, y) => x - y);
    cols = Math.min(12, Math.max(1, numbers.length));
    rows = Math.ceil(numbers.length / cols);
    cells = numbers.map((n, i) => ({
      label: `C${n}`,
      position: `C${n}`,
      col: i % cols,
      row: Math.floor(i / cols),
    }));
  } else {
    const large = all.some((p) => /^[I-P]/.test(p) || Number(p.slice(1)) > 12);
    rows = large ? 16 : 8;
    cols = large ? 24 : 12;
    rowLabels = 'ABCDEFGHIJKLMNOP'.slice(0, rows).split('');
    cells = [];
    for (let r = 0; r < rows; r++)
      for (let c = 0; c < cols; c++)
        cells.push({ label: '', position: `${rowLabels[r]}${c + 1}`, col: c, row: r });
  }
  const gutter = cuvettes ? 0 : 14;
  const cell = Math.min(30, (w.width - gutter) / cols);
  const height = gutter + rows * cell + 30;
  w.ensure(height);
  const x0 = w.left + gutter;
  const y0 = w.y + gutter;
  if (!cuvettes) {
    for (let c = 0; c < cols; c++)
      w.text(String(c + 1), x0 + c * cell, w.y + 2, { width: cell, align: 'center', size: 6, color: MUTED });
    rowLabels.forEach((label, r) =>
      w.text(label, w.left, y0 + r * cell + cell / 2 - 4, { width: gutter - 3, size: 6, color: MUTED }),
    );
  }
  for (const c of cells) {
    const x = x0 + c.col * cell + 1;
    const y = y0 + c.row * cell + 1;
    const size = cell - 2;
    const role = roles.get(c.position);
    const result = results.get(c.position);
    doc
      .roundedRect(x, y, size, size, 2)
      .fillColor(role ? (ROLE_COLOURS[role] ?? '#eeeeee') : '#ffffff')
      .fill();
    const status = result?.status;
    doc.roundedRect(x, y, size, size, 2).lineWidth(status === 'saturated' ? 1.5 : 0.4);
    if (status === 'missing' || status === 'no-reading') doc.dash(2, { space: 1.5 });
    doc
      .strokeColor(status === 'saturated' ? ALERT : '#90a4ae')
      .stroke()
      .undash();
    if (role) {
      const letter = ROLE_LETTERS[role] ?? '?';
      const label = cuvettes ? `${c.label} ${letter}` : letter;
      w.text(label, x, y + size / 2 - (cell > 20 ? 4 : 3), {
        width: size,
        align: 'center',
        size: cell > 20 ? 7 : 5.5,
        weight: 'bold',
        lineBreak: false,
      });
    }
    if (status === 'excluded') {
      doc
        .moveTo(x + 2, y + 2)
        .lineTo(x + size - 2, y + size - 2)
        .moveTo(x + size - 2, y + 2)
        .lineTo(x + 2, y + size - 2)
        .lineWidth(1)
        .strokeColor(ALERT)
        .stroke();
    }
  }
  w.y = y0 + rows * cell + 6;
  let lx = w.left;
  for (const [role, colour] of Object.entries(ROLE_COLOURS)) {
    doc
      .rect(lx, w.y + 1, 8, 8)
      .fillColor(colour)
      .fill();
    w.text(`${ROLE_LETTERS[role]} ${role}`, lx + 11, w.y, { size: 7, lineBreak: false });
    lx += 70;
  }
  w.text('× excluded · red edge saturated · dashed edge missing', lx, w.y, {
    size: 7,
    color: MUTED,
    lineBreak: false,
  });
  w.y += 18;
}

function drawCalibrationPlot(w: ReportWriter, cal: CalibrationResult): void {
  const doc = w.doc;
  const plotH = 170;
  const residH = 70;
  w.ensure(plotH + residH + 50);
  const padLeft = 44;
  const x0 = w.left + padLeft;
  const plotW = w.width - padLeft - 10;
  const maxC = Math.max(...cal.points.map((p) => p.concentrationM), 0);
  const { factor, unit } = concentrationScale(maxC);
  const xMax = maxC * 1.05 || 1;
  const absValues = [...cal.points.map((p) => p.absorbance), cal.intercept, cal.slope * xMax + cal.intercept];
  const yLo = Math.min(0, ...absValues);
  const yHi = Math.max(...absValues) * 1.08 || 1;
  const px = (c: number): number => x0 + (c / xMax) * plotW;
  const top = w.y;
  const py = (aValue: number): number => top + plotH - ((aValue - yLo) / (yHi - yLo)) * plotH;

  // Frame, grid and ticks.
  doc.rect(x0, top, plotW, plotH).lineWidth(0.5).strokeColor('#90a4ae').stroke();
  for (const t of niceTicks(yLo, yHi)) {
    doc
      .moveTo(x0, py(t))
      .lineTo(x0 + plotW, py(t))
      .lineWidth(0.2)
      .strokeColor('#e0e0e0')
      .stroke();
    w.text(formatNumber(t, 3), w.left, py(t) - 4, {
      width: padLeft - 4,
      align: 'right',
      size: 6.5,
      color: MUTED,
    });
  }
  const xTicks = niceTicks(0, xMax * factor);
  // Fitted line over the concentration range.
  doc
    .moveTo(px(0), py(cal.intercept))
    .lineTo(px(xMax), py(cal.slope * xMax + cal.intercept))
    .lineWidth(1)
    .strokeColor(ACCENT)
    .stroke();
  for (const p of cal.points) {
    const colour = p.outlier ? ALERT : p.aboveLinearRange ? '#ef6c00' : INK;
    doc.circle(px(p.concentrationM), py(p.absorbance), 2.6).fillColor(colour).fill();
  }
  w.text('Absorbance', x0 + 4, top + 3, { size: 7, color: MUTED, lineBreak: false });
  w.text(
    `A = ${formatNumber(cal.slope)}·c ${cal.intercept < 0 ? '−' : '+'} ${formatNumber(Math.abs(cal.intercept))}   R² = ${cal.r2.toFixed(5)}`,
    x0 + plotW - 260,
    top + plotH - 14,
    { width: 254, align: 'right', size: 7.5, color: ACCENT, lineBreak: false },
  );

  // Residuals beneath, on the same concentration axis.
  const rTop = top + plotH + 8;
  const maxRes = Math.max(...cal.points.map((p) => Math.abs(p.residual)), 1e-9) * 1.2;
  const ry = (r: number): number => rTop + residH / 2 - (r / maxRes) * (residH / 2);
  doc.rect(x0, rTop, plotW, residH).lineWidth(0.5).strokeColor('#90a4ae').stroke();
  doc
    .moveTo(x0, ry(0))
    .lineTo(x0 + plotW, ry(0))
    .lineWidth(0.6)
    .strokeColor(ACCENT)
    .stroke();
  for (const p of cal.points) {
    doc
      .moveTo(px(p.concentrationM), ry(0))
      .lineTo(px(p.concentrationM), ry(p.residual))
      .lineWidth(0.5)
      .strokeColor(MUTED)
      .stroke();
    doc
      .circle(px(p.concentrationM), ry(p.residual), 2.2)
      .fillColor(p.outlier ? ALERT : INK)
      .fill();
  }
  w.text(formatNumber(maxRes / 1.2, 2), w.left, ry(maxRes / 1.2) - 4, {
    width: padLeft - 4,
    align: 'right',
    size: 6.5,
    color: MUTED,
  });
  w.text('0', w.left, ry(0) - 4, { width: padLeft - 4, align: 'right', size: 6.5, color: MUTED });
  w.text('Residual', x0 + 4, rTop + 3, { size: 7, color: MUTED, lineBreak: false });
  for (const t of xTicks) {
    const x = px(t / factor);
    if (x > x0 + plotW + 1) continue;
    doc
      .moveTo(x, rTop + residH)
      .lineTo(x, rTop + residH + 3)
      .lineWidth(0.5)
      .strokeColor('#90a4ae')
      .stroke();
    w.text(formatNumber(t, 3), x - 20, rTop + residH + 4, {
      width: 40,
      align: 'center',
      size: 6.5,
      color: MUTED,
    });
  }
  w.text(`Concentration (${unit})`, x0, rTop + residH + 14, {
    width: plotW,
    align: 'center',
    size: 7.5,
    color: MUTED,
  });
  w.y = rTop + residH + 30;
}

/** The batch report as a PDF: metadata, layout map, calibration plot, result tables, QC, files, trail. */
export function renderBatchReport(input: BatchReportInput, options: PdfOptions = {}): Promise<Buffer> {
  const { analysis: a, trail } = input;
  const b = a.batch;
  const r = a.result;
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: 48, bottom: 40, left: 48, right: 48 },
    compress: options.compress ?? true,
    bufferPages: true,
    info: { Title: `Batch report: ${b.name}`, Author: 'Equilight', Subject: `Batch ${b.id}` },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const w = new ReportWriter(doc);
  const generated = (input.generatedAt ?? new Date()).toISOString().slice(0, 16).replace('T', ' ');

  w.text(`Batch report: ${b.name}`, w.left, w.y, { weight: 'bold', size: 17, width: w.width });
  w.y += w.heightOf(`Batch report: ${b.name}`, w.width, 17, 'bold') + 2;
  w.paragraph(`Equilight · batch ${b.id} · ${b.state} · generated ${generated} UTC`, {
    color: MUTED,
    size: 8.5,
  });

  if (r.stoichiometry?.verdict) {
    w.y += 4;
    const verdict = r.stoichiometry.verdict;
    const kLine = r.headline ? `K (${r.headline.model}) = ${r.headline.text}` : null;
    const verdictHeight = w.heightOf(verdict, w.width - 16, 10, 'bold');
    const h = verdictHeight + (kLine ? 14 : 0) + 12;
    w.ensure(h + 6);
    doc.rect(w.left, w.y, w.width, h).fillColor('#e3f2fd').fill();
    const boxStyle = { width: w.width - 16, weight: 'bold' as const, size: 10, color: '#0d47a1' };
    w.text(verdict, w.left + 8, w.y + 6, boxStyle);
    if (kLine) w.text(kLine, w.left + 8, w.y + 6 + verdictHeight + 2, boxStyle);
    w.y += h + 6;
  }

  w.heading('Batch');
  // An approved batch reports the settings its approval record froze.
  const s = a.record?.settings ?? b.settings;
  const rec = a.record;
  w.keyValues([
    ['Name', b.name],
    ['Instrument', b.profileName ?? `profile ${b.profileId}`],
    ['Layout', `${b.layoutName ?? `layout ${b.layoutId}`} v${b.layoutVersion}`],
    ['Manifest', `${b.manifestName ?? `manifest ${b.manifestId}`} v${b.manifestVersion}`],
    ['Run id', b.runId],
    ['System', b.systemName ?? '—'],
    ['Temperature', b.temperatureC === null ? '—' : `${b.temperatureC} °C`],
    ['Files', `${b.fileCount} of ${b.expectedFiles} expected stored`],
    ['Wavelength', r.wavelengthNm === null ? '—' : `${r.wavelengthNm} nm`],
    ['Path length', `${r.pathLengthCm} cm`],
    ['Calibration model', s.calibrationModel],
    ['Candidates', s.candidates.join(', ')],
    [
      'Thresholds',
      `R² at least ${s.r2Min}; replicate CV at most ${percent(s.replicateCvMax)}; K CV at most ${percent(s.kCvMax)}; linear range up to A = ${s.linearRangeMaxAbsorbance}`,
    ],
    [
      'ε from',
      s.epsilonSource && s.epsilonLPerMolCm !== null
        ? `${formatQuantity(s.epsilonLPerMolCm, EPSILON_UNIT)}, from batch "${s.epsilonSource.batchName}" (id ${s.epsilonSource.batchId}), ${s.epsilonSource.recordId !== null ? `approval record ${s.epsilonSource.recordId}` : `its analysis of ${s.epsilonSource.takenAt.slice(0, 16).replace('T', ' ')} UTC (not approved then)`}`
        : r.epsilonSource.kind === 'none'
          ? 'none (fitted with K)'
          : `${formatQuantity(r.epsilonSource.epsilonLPerMolCm, EPSILON_UNIT)} — ${r.epsilonSource.kind === 'given' ? 'given' : "this batch's standards"}`,
    ],
    ['Monte Carlo draws', String(s.monteCarloDraws)],
    [
      'Exclusions',
      s.exclusions.length ? s.exclusions.map((e) => `${e.position} (${e.reason})`).join('; ') : 'none',
    ],
    ...(rec
      ? ([
          [
            'Approval record',
            `record ${rec.id}, approved by ${rec.approvedBy ?? 'unknown'} on ${rec.approvedAt.slice(0, 16).replace('T', ' ')} UTC; this report shows the result stored then`,
          ],
          ['Analysis engine', `${rec.engine.version} (analysis module SHA-256 ${rec.engine.sourceSha256})`],
        ] as [string, string][])
      : []),
  ]);

  w.heading('Layout map', 120);
  drawLayoutMap(w, a);

  w.heading('Calibration', r.calibration ? 300 : 20);
  const cal = r.calibration;
  if (cal) {
    drawCalibrationPlot(w, cal);
    w.table(
      [
        { header: 'Quantity', width: 170 },
        { header: 'Value', width: 180, align: 'right' },
        { header: 'Unit', width: 149 },
      ],
      [
        ['Slope ± SE', withSe(cal.slope, cal.slopeSe), 'L·mol⁻¹'],
        ['Intercept ± SE', withSe(cal.intercept, cal.interceptSe), 'absorbance'],
        ['R²', cal.r2.toFixed(5), ''],
        ['Residual SD', formatNumber(cal.residualSd), 'absorbance'],
        ['ε ± SE', withSe(cal.epsilonLPerMolCm, cal.epsilonSe), EPSILON_UNIT],
        ['LOD', formatNumber(cal.lodM) + (cal.lodExtrapolated ? ' (extrapolated)' : ''), 'mol/L'],
        ['LOQ', formatNumber(cal.loqM) + (cal.loqExtrapolated ? ' (extrapolated)' : ''), 'mol/L'],
        [
          'Linearity (Mandel, ISO 8466-1)',
          cal.linearity
            ? `PW ${formatNumber(cal.linearity.testValue)} vs F ${formatNumber(cal.linearity.criticalValue)}: ${cal.linearity.curved ? 'curved' : 'linear'}`
            : 'needs 5 standards',
          '',
        ],
        ['Standards used', String(cal.n), ''],
      ],
    );
  } else {
    w.paragraph('No calibration: the batch has too few usable standards.', { color: MUTED });
  }

  w.heading('Unknowns and controls');
  w.table(
    [
      { header: 'Sample', width: 90 },
      { header: 'Kind', width: 48 },
      { header: 'n', width: 22, align: 'right' },
      { header: 'Absorbance', width: 60, align: 'right' },
      { header: 'Dilution', width: 44, align: 'right' },
      { header: 'c (M)', width: 70, align: 'right' },
      { header: 'SE (M)', width: 60, align: 'right' },
      { header: 'Flags', width: 105 },
    ],
    [
      ...r.unknowns.map((u) => ({ u, kind: 'unknown' })),
      ...r.controls.map((u) => ({ u, kind: 'control' })),
    ].map(({ u, kind }) => [
      u.sampleId,
      kind,
      String(u.n),
      formatNumber(u.absorbance),
      formatNumber(u.dilutionFactor),
      formatNumber(u.concentrationM),
      formatNumber(u.seM, 2),
      u.flags.join(', '),
    ]),
  );

  const models = r.stoichiometry?.candidates.map((c) => c.model) ?? [];
  w.heading('Mixtures');
  w.table(
    [
      { header: 'Sample', width: 62 },
      { header: 'A0 (M)', width: 50, align: 'right' },
      { header: 'B0 (M)', width: 50, align: 'right' },
      { header: 'x(B)', width: 32, align: 'right' },
      { header: 'Absorbance', width: 54, align: 'right' },
      { header: 'Complex (M)', width: 56, align: 'right' },
      ...models.map((m) => ({ header: `K ${m}`, width: 48, align: 'right' as const })),
    ],
    r.mixtures.map((m) => [
      m.sampleId,
      formatNumber(m.a0M),
      formatNumber(m.b0M),
      m.moleFractionB.toFixed(3),
      formatNumber(m.absorbance),
      formatNumber(m.productM),
      ...models.map((model) => {
        const row = m.ice.find((ice) => ice.model === model);
        return row ? (row.feasible ? formatNumber(row.k) : 'impossible') : '—';
      }),
    ]),
  );

  w.heading('Stoichiometry');
  w.table(
    [
      { header: 'Model', width: 36 },
      { header: 'Rank', width: 30, align: 'right' },
      { header: 'Mean K', width: 56, align: 'right' },
      { header: 'CV', width: 40, align: 'right' },
      { header: 'K (global fit)', width: 56, align: 'right' },
      { header: '95 % CI', width: 100, align: 'right' },
      { header: 'AIC', width: 44, align: 'right' },
      { header: 'ΔAIC', width: 36, align: 'right' },
      { header: 'Weight', width: 38, align: 'right' },
      { header: 'Unit', width: 30 },
      { header: 'Note', width: 120 },
    ],
    (r.stoichiometry?.candidates ?? []).map((c) => [
      c.model,
      String(c.rank),
      formatNumber(c.kMean),
      percent(c.kCv),
      formatKValue(c.fit),
      c.fit?.status === 'determined' && c.fit.kCi95
        ? `${formatNumber(c.fit.kCi95[0])} – ${formatNumber(c.fit.kCi95[1])}`
        : c.fit
          ? c.fit.status.replace('-', ' ')
          : '—',
      formatNumber(c.fit?.aic, 4),
      formatNumber(c.deltaAic, 3),
      formatNumber(c.akaikeWeight, 2),
      kPdfUnit(c.model),
      c.ruledOut ? `ruled out: ${c.reason}` : c.reason,
    ]),
    'No mixtures, or no ε: no stoichiometry was assessed.',
  );
  if (r.stoichiometry?.verdict) w.paragraph(r.stoichiometry.verdict, { weight: 'bold' });
  if (r.headline) w.paragraph(`${r.kNote} ${r.epsilonSource.note}.`, { color: MUTED });
  const u = r.uncertainty;
  if (u?.propagation || u?.monteCarlo) {
    const parts: string[] = [];
    if (u.propagation) parts.push(`propagated SD of K ${formatNumber(u.propagation.kSd)} (${u.model})`);
    if (u.monteCarlo)
      parts.push(
        `Monte Carlo (${u.monteCarlo.draws} draws) median K ${formatNumber(u.monteCarlo.kMedian)}, 95 % interval ${formatNumber(u.monteCarlo.kCi95[0])} to ${formatNumber(u.monteCarlo.kCi95[1])}`,
      );
    w.paragraph(`Uncertainty of K: ${parts.join('; ')}.`);
  }

  w.heading('QC flags');
  w.table(
    [
      { header: 'Severity', width: 50 },
      { header: 'Code', width: 100 },
      { header: 'Position', width: 45 },
      { header: 'Message', width: 304 },
    ],
    r.qc.map((f) => [f.severity, f.code, f.position ?? '', f.message]),
    'No QC flags.',
  );
  if (r.warnings.length)
    for (const warning of r.warnings) w.paragraph(`Note: ${warning}`, { color: MUTED, size: 8 });

  w.heading('Files');
  w.table(
    [
      { header: 'File', width: 122 },
      { header: 'Received (UTC)', width: 68 },
      { header: 'SHA-256', width: 309 },
    ],
    (rec?.files ?? a.files).map((f) => [
      f.originalName,
      f.receivedAt.slice(0, 16).replace('T', ' '),
      f.sha256,
    ]),
    'No files stored yet.',
  );

  w.heading('Review and approval trail');
  w.table(
    [
      { header: 'When (UTC)', width: 80 },
      { header: 'Who', width: 125 },
      { header: 'Action', width: 50 },
      { header: 'What and why', width: 244 },
    ],
    trail.map((e) => [
      e.at.slice(0, 16).replace('T', ' '),
      e.actorName,
      e.action,
      e.reason ? `${e.summary} — ${e.reason}` : e.summary,
    ]),
  );
  const state =
    b.state === 'approved'
      ? `Approved by ${b.approvedBy ?? 'unknown'} on ${b.approvedAt?.slice(0, 16).replace('T', ' ') ?? '—'}: ${b.approvalComment ?? ''}`
      : b.state === 'reviewed'
        ? `Reviewed by ${b.reviewedBy ?? 'unknown'}; not yet approved.`
        : 'Open: neither reviewed nor approved.';
  w.paragraph(state, { weight: 'bold' });

  // Page numbers.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottomMargin = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    w.text(`${b.name} · page ${i + 1} of ${range.count}`, w.left, doc.page.height - 30, {
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
