import path from 'node:path';
import { loadWoffFont } from './woff';

/**
 * The report's fonts: Noto Sans (shipped with the app as WOFF subsets, unpacked once), a fallback per
 * script, stand-ins for symbols none of the subsets draws, and superscripts drawn raised.
 */

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

export type Weight = 'regular' | 'bold';

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
export function caretSuperscripts(text: string): string {
  return text.replace(
    /[⁻⁰¹²³⁴-⁹]+/g,
    (run) => `^${[...run].map((c) => (c === '⁻' ? '-' : superscriptBase(c))).join('')}`,
  );
}

/** Superscripts are drawn smaller and top-aligned (pdfkit places a run's top at the line's top). */
export const SUPERSCRIPT_SCALE = 0.68;

/** One stretch of text that one font subset draws; `sup` stretches are drawn raised and smaller. */
export interface FontRun {
  font: string;
  text: string;
  sup: boolean;
}

/** Register every weight and subset with a document under the names `fontRuns` uses. */
export function registerFonts(doc: PDFKit.PDFDocument): void {
  for (const weight of ['regular', 'bold'] as const) {
    const number = weight === 'bold' ? 700 : 400;
    for (const subset of ['latin', ...SUBSETS.map((s) => s.name)])
      doc.registerFont(
        `${weight}-${subset}`,
        loadWoffFont(path.join(FONT_DIR, `noto-sans-${subset}-${number}-normal.woff`)),
      );
  }
}

/** Split text into runs that one font subset can draw. */
export function fontRuns(text: string, weight: Weight): FontRun[] {
  const runs: FontRun[] = [];
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
