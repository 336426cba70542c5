import type { CalibrationResult, JobBatchResult, MixtureResult, PositionResult } from '../../analysis';
import { formatNumber } from '../../analysis/number-format';
import { ROLE_CODE, SAMPLE_ROLES } from '../../contracts/role-code';
import { ACCENT, ALERT, INK, MUTED, type ReportWriter } from './pdf-writer';
import { fillRole, roleLetterChip, roleOf } from './role-swatch';

/** The report's drawings: layout map, calibration with residuals, Job's plot. */

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

/** The plate or cuvette row, each position coloured by role and marked by what happened to it. */
export function drawLayoutMap(
  w: ReportWriter,
  positions: readonly PositionResult[],
  roles: ReadonlyMap<string, string>,
): void {
  const doc = w.doc;
  const results = new Map<string, PositionResult>(positions.map((p) => [p.position, p]));
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
    const role = roleOf(roles.get(c.position));
    const result = results.get(c.position);
    if (role) fillRole(doc, role, { x, y, size, radius: 2 });
    else doc.roundedRect(x, y, size, size, 2).fillColor('#ffffff').fill();
    const status = result?.status;
    doc.roundedRect(x, y, size, size, 2).lineWidth(status === 'saturated' ? 1.5 : 0.5);
    if (status === 'missing' || status === 'no-reading') doc.dash(2, { space: 1.5 });
    doc
      .strokeColor(status === 'saturated' ? ALERT : role ? ROLE_CODE[role].ink : '#90a4ae')
      .stroke()
      .undash();
    if (role) {
      const code = ROLE_CODE[role];
      const label = cuvettes ? `${c.label} ${code.letter}` : code.letter;
      const fontSize = cell > 20 ? 7 : 5.5;
      const chipW = w.widthOf(label, fontSize, 'bold') + fontSize * 0.6;
      roleLetterChip(doc, role, x + size / 2, y + size / 2, chipW, fontSize * 1.25);
      w.text(label, x, y + size / 2 - fontSize * 0.62, {
        width: size,
        align: 'center',
        size: fontSize,
        weight: 'bold',
        color: code.ink,
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
  for (const role of SAMPLE_ROLES) {
    const code = ROLE_CODE[role];
    fillRole(doc, role, { x: lx, y: w.y, size: 10, radius: 1.5 }, 3.5);
    doc.roundedRect(lx, w.y, 10, 10, 1.5).lineWidth(0.5).strokeColor(code.ink).stroke();
    w.text(`${code.letter} ${code.label.toLowerCase()}`, lx + 13, w.y + 1, { size: 7, lineBreak: false });
    lx += 62;
  }
  w.text('× excluded · red edge saturated · dashed edge missing', lx, w.y, {
    size: 7,
    color: MUTED,
    lineBreak: false,
  });
  w.y += 18;
}

/** Calibration points with the fitted line, and their residuals beneath on the same axis. */
/** A plot's frame, its horizontal grid lines and the y tick labels left of it. */
function drawFrameAndYGrid(
  w: ReportWriter,
  box: { x0: number; top: number; plotW: number; plotH: number; padLeft: number },
  yLo: number,
  yHi: number,
  py: (y: number) => number,
): void {
  const { x0, top, plotW, plotH, padLeft } = box;
  w.doc.rect(x0, top, plotW, plotH).lineWidth(0.5).strokeColor('#90a4ae').stroke();
  for (const t of niceTicks(yLo, yHi)) {
    w.doc
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
}

export function drawCalibrationPlot(w: ReportWriter, cal: CalibrationResult): void {
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
  drawFrameAndYGrid(w, { x0, top, plotW, plotH, padLeft }, yLo, yHi, py);
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

/**
 * Job's plot: absorbance of the series' mixtures against the mole fraction of B, the two straight
 * branches fitted to them and the mole fraction where they meet.
 */
export function drawJobPlot(w: ReportWriter, job: JobBatchResult, mixtures: readonly MixtureResult[]): void {
  const doc = w.doc;
  const plotH = 160;
  w.ensure(plotH + 40);
  const padLeft = 44;
  const x0 = w.left + padLeft;
  const plotW = Math.min(w.width - padLeft - 10, 360);
  const points = mixtures
    .filter((m) => m.absorbance !== null)
    .map((m) => ({ x: m.moleFractionB, y: m.absorbance as number }));
  const branchAt = (branch: JobBatchResult['left'], x: number): number | null =>
    branch ? branch.slope * x + branch.intercept : null;
  const xMax = job.maxMoleFractionB;
  const lineEnds = [
    branchAt(job.left, 0),
    xMax !== null ? branchAt(job.left, xMax) : null,
    branchAt(job.right, 1),
  ].filter((v): v is number => v !== null && Number.isFinite(v));
  const ys = [...points.map((p) => p.y), ...lineEnds, 0];
  const yLo = Math.min(...ys);
  const yHi = Math.max(...ys) * 1.1 || 1;
  const top = w.y;
  const px = (x: number): number => x0 + x * plotW;
  const py = (y: number): number => top + plotH - ((y - yLo) / (yHi - yLo)) * plotH;

  drawFrameAndYGrid(w, { x0, top, plotW, plotH, padLeft }, yLo, yHi, py);
  // The branches, clipped to the frame: the rising one up to the maximum, the falling one from it.
  doc.save();
  doc.rect(x0, top, plotW, plotH).clip();
  const drawBranch = (branch: JobBatchResult['left'], from: number, to: number): void => {
    const a = branchAt(branch, from);
    const b = branchAt(branch, to);
    if (a === null || b === null) return;
    doc.moveTo(px(from), py(a)).lineTo(px(to), py(b)).lineWidth(1).strokeColor(ACCENT).stroke();
  };
  if (xMax !== null) {
    drawBranch(job.left, 0, xMax);
    drawBranch(job.right, xMax, 1);
    doc
      .moveTo(px(xMax), top)
      .lineTo(px(xMax), top + plotH)
      .dash(3, { space: 2 })
      .lineWidth(0.6)
      .strokeColor(ALERT)
      .stroke()
      .undash();
  }
  doc.restore();
  for (const p of points) doc.circle(px(p.x), py(p.y), 2.6).fillColor(INK).fill();
  w.text('Absorbance', x0 + 4, top + 3, { size: 7, color: MUTED, lineBreak: false });
  if (xMax !== null)
    w.text(
      `maximum at x(B) = ${xMax.toFixed(3)}${job.nearestModel ? ` (nearest ${job.nearestModel})` : ''}`,
      x0 + plotW - 204,
      top + 3,
      { width: 200, align: 'right', size: 7.5, color: ALERT, lineBreak: false },
    );
  for (const t of [0, 0.2, 0.4, 0.6, 0.8, 1]) {
    doc
      .moveTo(px(t), top + plotH)
      .lineTo(px(t), top + plotH + 3)
      .lineWidth(0.5)
      .strokeColor('#90a4ae')
      .stroke();
    w.text(t.toFixed(1), px(t) - 20, top + plotH + 4, {
      width: 40,
      align: 'center',
      size: 6.5,
      color: MUTED,
    });
  }
  w.text('Mole fraction of B, B₀/(A₀ + B₀)', x0, top + plotH + 14, {
    width: plotW,
    align: 'center',
    size: 7.5,
    color: MUTED,
  });
  w.y = top + plotH + 30;
}
