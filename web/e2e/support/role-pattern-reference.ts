import {
  ROLE_PATTERN_OPACITY,
  ROLE_PATTERN_TILE,
  type RoleCode,
  rolePatternMarks,
} from '@equilight/contracts';

/**
 * A role's pattern as defined, for comparison with what the app draws: an SVG the size of its box, filled
 * with the role's colour and an SVG <pattern> of the contracts' marks tiled from the box's top left corner.
 * (The app drew each mark this way before it repeated one tile; role-pattern.e2e.ts and bench:role-marks
 * compare against it.)
 */
export function perBoxPatternSvg(code: RoleCode): string {
  const t = ROLE_PATTERN_TILE;
  const marks = rolePatternMarks(code.pattern, t);
  const lines = marks.lines.map(([x1, y1, x2, y2]) => `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}"/>`);
  const dots = marks.dots.map(([cx, cy, r]) => `<circle cx="${cx}" cy="${cy}" r="${r}"/>`);
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="100%" height="100%"><defs>` +
    `<pattern id="p" width="${t}" height="${t}" patternUnits="userSpaceOnUse">` +
    `<g stroke="${code.ink}" fill="${code.ink}" stroke-width="${marks.lineWidth}" opacity="${ROLE_PATTERN_OPACITY}">` +
    `${lines.join('')}${dots.join('')}</g></pattern></defs>` +
    `<rect width="100%" height="100%" fill="${code.fill}"/><rect width="100%" height="100%" fill="url(#p)"/></svg>`
  );
}
