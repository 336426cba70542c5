import fs from 'node:fs';
import path from 'node:path';
import { ROLE_CODE, ROLE_PATTERN_TILE, SAMPLE_ROLES, rolePatternMarks } from '../role-code';

/**
 * WCAG 2.x contrast ratio (W3C, Web Content Accessibility Guidelines 2.1, definitions of "relative
 * luminance" and "contrast ratio"): (L1 + 0.05) / (L2 + 0.05) over sRGB relative luminances.
 */
function relativeLuminance(hex: string): number {
  const n = Number.parseInt(hex.slice(1), 16);
  const channel = (v: number) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel((n >> 16) & 255) + 0.7152 * channel((n >> 8) & 255) + 0.0722 * channel(n & 255);
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** A tone of the app's neutral palette, read from the theme so that a palette change is checked too. */
function neutralTone(tone: number): string {
  const scss = fs.readFileSync(path.resolve(__dirname, '../../../../web/src/theme/_palette.scss'), 'utf8');
  const block = scss.slice(scss.indexOf('$equilight-neutral'));
  const match = new RegExp(`\\n\\s*${tone}: (#[0-9a-f]{6})`, 'i').exec(block);
  if (!match) throw new Error(`neutral tone ${tone} not in the palette`);
  return match[1];
}

describe('the sample-role code', () => {
  it('when the contrast helper is checked against published values then it agrees', () => {
    // WCAG 2.x: contrast ratios range from 1:1 to 21:1 (black on white).
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
    expect(contrast('#ffffff', '#ffffff')).toBeCloseTo(1, 6);
    // #767676 on white is the lightest grey that passes AA for body text, 4.54:1 (from memory, widely cited).
    expect(contrast('#767676', '#ffffff')).toBeCloseTo(4.54, 2);
  });

  it('when every role is listed then each has its own colour, pattern and letter', () => {
    const codes = SAMPLE_ROLES.map((r) => ROLE_CODE[r]);
    expect(Object.keys(ROLE_CODE).sort()).toEqual([...SAMPLE_ROLES].sort());
    for (const key of ['fill', 'ink', 'pattern', 'letter', 'label', 'patternLabel'] as const) {
      expect(new Set(codes.map((c) => c[key].toLowerCase())).size).toBe(SAMPLE_ROLES.length);
    }
    for (const c of codes) {
      expect(c.letter).toMatch(/^[A-Z]$/);
      expect(c.label.startsWith(c.letter)).toBe(true);
      expect(c.fill).toMatch(/^#[0-9a-f]{6}$/);
      expect(c.ink).toMatch(/^#[0-9a-f]{6}$/);
    }
  });

  it('when fills are compared then no two are close (colour differs as well as pattern)', () => {
    const fills = SAMPLE_ROLES.map((r) => ROLE_CODE[r].fill);
    const rgb = (hex: string) => [16, 8, 0].map((s) => (Number.parseInt(hex.slice(1), 16) >> s) & 255);
    for (let i = 0; i < fills.length; i++)
      for (let j = i + 1; j < fills.length; j++) {
        const [a, b] = [rgb(fills[i]), rgb(fills[j])];
        const distance = Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
        // common practice: about 40 in sRGB units tells two swatches apart at a glance
        expect(distance).toBeGreaterThan(40);
      }
  });

  it('when the letter is drawn on its fill then it meets WCAG AA for text (4.5:1)', () => {
    for (const role of SAMPLE_ROLES) {
      const { ink, fill } = ROLE_CODE[role];
      expect({ role, ratio: contrast(ink, fill) >= 4.5 }).toEqual({ role, ratio: true });
    }
  });

  it('when a well sits on the light or the dark theme then it stands out (3:1, non-text contrast)', () => {
    const light = [neutralTone(98), neutralTone(100), neutralTone(90)];
    const dark = [neutralTone(6), neutralTone(12), neutralTone(24)];
    for (const role of SAMPLE_ROLES) {
      const { ink, fill } = ROLE_CODE[role];
      for (const surface of light) expect(contrast(ink, surface)).toBeGreaterThanOrEqual(3);
      for (const surface of dark) expect(contrast(fill, surface)).toBeGreaterThanOrEqual(3);
    }
  });

  it('when a pattern is laid out then its marks fit the tile and only the solid one is empty', () => {
    const t = ROLE_PATTERN_TILE;
    const patterns = SAMPLE_ROLES.map((r) => ROLE_CODE[r].pattern);
    for (const p of patterns) {
      const marks = rolePatternMarks(p);
      const count = marks.lines.length + marks.dots.length;
      expect(count === 0).toBe(p === 'solid');
      for (const [cx, cy, r] of marks.dots) {
        expect(cx - r).toBeGreaterThanOrEqual(0);
        expect(cy + r).toBeLessThanOrEqual(t);
      }
      expect(marks.lineWidth).toBeGreaterThan(0);
    }
    // a tile of another size scales the marks
    expect(rolePatternMarks('bars', 12).lines[0]).toEqual([0, 6, 12, 6]);
  });
});
