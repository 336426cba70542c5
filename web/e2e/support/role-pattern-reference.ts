import { ROLE_PATTERN_TILE, type RoleCode } from '@equilight/contracts';
import { rolePatternMarksSvg } from '../../src/app/shared/role-code/role-style';

/**
 * A role's pattern as an SVG <pattern> defines it, for comparison with the app's repeated tile: an SVG the
 * size of its box, filled with the role's colour and a <pattern> of the same marks tiled from the box's top
 * left corner. (The app drew each mark this way before it repeated one tile; role-pattern.e2e.ts and
 * bench:role-marks compare against it.)
 */
export function perBoxPatternSvg(code: RoleCode): string {
  const t = ROLE_PATTERN_TILE;
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="100%" height="100%"><defs>` +
    `<pattern id="p" width="${t}" height="${t}" patternUnits="userSpaceOnUse">${rolePatternMarksSvg(code)}` +
    `</pattern></defs><rect width="100%" height="100%" fill="${code.fill}"/>` +
    `<rect width="100%" height="100%" fill="url(#p)"/></svg>`
  );
}
