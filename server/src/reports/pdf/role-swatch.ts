import {
  ROLE_CODE,
  ROLE_PATTERN_OPACITY,
  ROLE_PATTERN_TILE,
  type SampleRole,
  rolePatternMarks,
} from '../../contracts/role-code';

/** The role of a layout's text, or null when it names none. */
export function roleOf(value: string | undefined): SampleRole | null {
  return value !== undefined && Object.hasOwn(ROLE_CODE, value) ? (value as SampleRole) : null;
}

/**
 * Fills a box with a sample role's colour and pattern, as vector paths (the contracts' role code, drawn
 * from the same pattern marks as the web's SVG). `tile` is the pattern's repeat in points.
 */
export function fillRole(
  doc: PDFKit.PDFDocument,
  role: SampleRole,
  box: { x: number; y: number; size: number; radius: number },
  tile = ROLE_PATTERN_TILE * 0.75,
): void {
  const code = ROLE_CODE[role];
  const { x, y, size, radius } = box;
  doc.save();
  doc.roundedRect(x, y, size, size, radius).fillColor(code.fill).fill();
  const marks = rolePatternMarks(code.pattern, tile);
  if (marks.lines.length || marks.dots.length) {
    doc.roundedRect(x, y, size, size, radius).clip();
    doc.strokeColor(code.ink).fillColor(code.ink).opacity(ROLE_PATTERN_OPACITY).lineWidth(marks.lineWidth);
    const n = Math.ceil(size / tile);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        const ox = x + i * tile;
        const oy = y + j * tile;
        for (const [x1, y1, x2, y2] of marks.lines) doc.moveTo(ox + x1, oy + y1).lineTo(ox + x2, oy + y2);
        if (marks.lines.length) doc.stroke();
        for (const [cx, cy, r] of marks.dots) doc.circle(ox + cx, oy + cy, r);
        if (marks.dots.length) doc.fill();
      }
  }
  doc.restore();
}

/** The chip behind a role letter: the role's fill, `width` × `height` points centred on (cx, cy). */
export function roleLetterChip(
  doc: PDFKit.PDFDocument,
  role: SampleRole,
  cx: number,
  cy: number,
  width: number,
  height: number,
): void {
  doc
    .roundedRect(cx - width / 2, cy - height / 2, width, height, height * 0.2)
    .fillColor(ROLE_CODE[role].fill)
    .fill();
}
