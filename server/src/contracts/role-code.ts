import { SAMPLE_ROLES, type SampleRole } from '../analysis/types';

/**
 * The one code for sample roles, on every screen and in every report: a colour, a pattern and a letter
 * per role, so that no role is told apart by colour alone. The layout editor, the batch page's plate map,
 * the legends and the PDF plate map all draw from this table; no other place defines role colours.
 *
 * Colours: `fill` is the well's ground, `ink` draws the letter, the pattern marks and the rim. The same
 * pair serves the light and the dark theme (a well looks the same on either): the letter has at least
 * 4.5:1 contrast on the fill (WCAG 2.x AA for text), the fill at least 3:1 against the dark surfaces
 * and the ink rim at least 3:1 against the light ones (non-text contrast); `role-code.spec.ts` checks it.
 */

export type RolePattern = 'solid' | 'hatch' | 'dots' | 'cross' | 'bars';

export interface RoleCode {
  /** The word people see. */
  label: string;
  /** One capital letter, drawn in the well. */
  letter: string;
  pattern: RolePattern;
  /** The pattern in words, for screen readers and the legend's text. */
  patternLabel: string;
  /** Ground colour of the well (sRGB hex). */
  fill: string;
  /** Letter, pattern marks and rim (sRGB hex). */
  ink: string;
}

export { SAMPLE_ROLES, type SampleRole };

export const ROLE_CODE: Readonly<Record<SampleRole, RoleCode>> = {
  blank: {
    label: 'Blank',
    letter: 'B',
    pattern: 'solid',
    patternLabel: 'plain',
    fill: '#dedad0',
    ink: '#3b3830',
  },
  standard: {
    label: 'Standard',
    letter: 'S',
    pattern: 'bars',
    patternLabel: 'horizontal bars',
    fill: '#efc266',
    ink: '#4a3000',
  },
  unknown: {
    label: 'Unknown',
    letter: 'U',
    pattern: 'hatch',
    patternLabel: 'diagonal hatch',
    fill: '#93c3e6',
    ink: '#0f3452',
  },
  mixture: {
    label: 'Mixture',
    letter: 'M',
    pattern: 'dots',
    patternLabel: 'dots',
    fill: '#cbb2e8',
    ink: '#3a2160',
  },
  control: {
    label: 'Control',
    letter: 'C',
    pattern: 'cross',
    patternLabel: 'cross-hatch',
    fill: '#9fd6ad',
    ink: '#0f3d20',
  },
};

/** Side of one pattern tile, in the drawing's own units (CSS px in the web, points in the PDF). */
export const ROLE_PATTERN_TILE = 6;

/** Strength of the pattern marks over the fill (opacity of the ink), kept low so the letter stays legible. */
export const ROLE_PATTERN_OPACITY = 0.5;

/** What one tile of a pattern holds: line segments [x1, y1, x2, y2] and dots [cx, cy, r]. */
export interface RolePatternMarks {
  lines: readonly (readonly [number, number, number, number])[];
  dots: readonly (readonly [number, number, number])[];
  /** Stroke width of the lines. */
  lineWidth: number;
}

/**
 * The marks of one tile of `pattern`, `tile` units square, drawn so that tiles join seamlessly. The web
 * turns them into an SVG `<pattern>` tile and the PDF into vector strokes repeated over the well.
 */
export function rolePatternMarks(pattern: RolePattern, tile = ROLE_PATTERN_TILE): RolePatternMarks {
  const t = tile;
  const h = t / 2;
  // A diagonal "/" through the tile, with the corner pieces that continue the neighbours' lines.
  const rising = [
    [0, t, t, 0],
    [-h, h, h, -h],
    [h, t + h, t + h, h],
  ] as const;
  const falling = [
    [0, 0, t, t],
    [-h, h, h, t + h],
    [h, -h, t + h, h],
  ] as const;
  const lineWidth = t / 6;
  switch (pattern) {
    case 'solid':
      return { lines: [], dots: [], lineWidth };
    case 'bars':
      return { lines: [[0, h, t, h]], dots: [], lineWidth: t / 5 };
    case 'hatch':
      return { lines: rising, dots: [], lineWidth };
    case 'cross':
      return { lines: [...rising, ...falling], dots: [], lineWidth: t / 8 };
    case 'dots':
      return { lines: [], dots: [[h, h, t / 5]], lineWidth };
  }
}
