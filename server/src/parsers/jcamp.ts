import { convert, type Entry } from 'jcampconverter';
import { ParseError, showCell } from './parse-error';
import type { ParseRules } from './parse-rules';
import { describePositions, isValidPosition, normalisePosition } from './position';
import { ReadingSet, type ParsedRun } from './reading-set';

/** Where a JCAMP-DX block's position is read: its `##TITLE=` or its `##SAMPLE DESCRIPTION=` (else `##NAMES=`). */
export type JcampPositionSource = 'title' | 'sample_description';

/** Wavelength units of `##XUNITS=` and their factor to nanometres. */
const X_UNITS: Record<string, number> = {
  NANOMETERS: 1,
  NANOMETER: 1,
  NM: 1,
  MICROMETERS: 1000,
  MICROMETER: 1000,
  MICRONS: 1000,
  UM: 1000,
};
/** The wavelengths a UV-Vis(-NIR) block may hold, nm (the profile's default-wavelength bounds). */
const MIN_NM = 100;
const MAX_NM = 3300;

const labelText = (v: unknown): string =>
  Array.isArray(v) ? String(v[0] ?? '') : v === undefined || v === null ? '' : String(v);

/** 1-based line of every `##TITLE=` in the text, in order: blocks are named by the line they start on. */
function titleLines(text: string): number[] {
  const out: number[] = [];
  text.split(/\r\n|\n|\r/).forEach((line, i) => {
    if (/^\s*##\s*TITLE\s*=/i.test(line)) out.push(i + 1);
  });
  return out;
}

/** The first word of `text` that is a position of the plate format (`well B3` → B3, `C2 JOB-1` → C2). */
function positionIn(text: string, rules: ParseRules): string | undefined {
  for (const word of text.split(/[^A-Za-z0-9]+/)) {
    const normal = normalisePosition(word);
    if (normal !== undefined && isValidPosition(normal, rules.plateFormat)) return normal;
  }
  return undefined;
}

/**
 * Reads a JCAMP-DX (IUPAC) UV-Vis file: one block, or linked blocks (`##BLOCKS=`), each a spectrum of one
 * position as `##XYDATA= (X++(Y..Y))` (any of the standard's compressions) or `##PEAK TABLE= (XY..XY)`,
 * through the jcampconverter package. A block's position comes from its title or sample description
 * (profile rule `jcampPositionFrom`); wavelengths in nm or µm become nm, `##YUNITS=` must be absorbance.
 * `##NPOINTS=` must match the points read (a cut or garbled line, or a `?`, changes the count). Any problem
 * throws a ParseError naming the block's first line and title.
 */
export function parseJcamp(text: string, file: string, rules: ParseRules): ParsedRun {
  if (!/^\s*##\s*TITLE\s*=/im.test(text))
    throw new ParseError({
      file,
      expected: 'a JCAMP-DX file: labelled records from "##TITLE=" to "##END="',
      found: text.trimStart().split(/\r?\n/, 1)[0] ?? '',
    });
  if (!/##\s*END\s*=/i.test(text))
    throw new ParseError({ file, detail: 'the JCAMP-DX file ends before its "##END=" (cut off?)' });
  let entries: Entry[];
  try {
    entries = convert(text, {
      keepRecordsRegExp: /^(SAMPLEDESCRIPTION|NAMES|NPOINTS|FIRSTX|LASTX)$/,
    }).flatten;
  } catch (e) {
    throw new ParseError({
      file,
      detail: `not a readable JCAMP-DX file (${showCell((e as Error).message)})`,
    });
  }
  const lines = titleLines(text);
  const blocks = entries
    .map((entry, i) => ({ entry, line: lines[i] }))
    .filter(({ entry }) => !/LINK/i.test(entry.dataType ?? '') && !entry.info['BLOCKS']);
  if (blocks.length === 0)
    throw new ParseError({ file, detail: 'no spectrum: the JCAMP-DX file has no data block' });
  const set = new ReadingSet(file);
  const source: JcampPositionSource = rules.jcampPositionFrom;
  for (const { entry, line } of blocks) {
    const title = entry.title ?? labelText(entry.info['TITLE']);
    const where = { file, line, column: title ? `block ${excerptTitle(title)}` : undefined };
    const dataType = entry.dataType ?? labelText(entry.info['DATATYPE']);
    if (!/UV|VIS/i.test(dataType))
      throw new ParseError({
        ...where,
        expected: '##DATA TYPE= UV/VIS SPECTRUM',
        found: dataType || '(none)',
      });
    const spectrum = entry.spectra[0];
    if (!spectrum || !spectrum.data?.x?.length)
      throw new ParseError({
        ...where,
        detail: 'no spectrum data: expected ##XYDATA= (X++(Y..Y)) or ##PEAK TABLE= (XY..XY)',
      });
    const xUnits = String(spectrum.xUnits ?? labelText(entry.info['XUNITS']))
      .trim()
      .toUpperCase();
    const factor = X_UNITS[xUnits];
    if (factor === undefined)
      throw new ParseError({ ...where, expected: '##XUNITS= NANOMETERS (or MICROMETERS)', found: xUnits });
    const yUnits = String(spectrum.yUnits ?? labelText(entry.info['YUNITS']))
      .trim()
      .toUpperCase();
    if (yUnits !== 'ABSORBANCE')
      throw new ParseError({ ...where, expected: '##YUNITS= ABSORBANCE', found: yUnits || '(none)' });
    const declared = Number(labelText(entry.info['NPOINTS']) || NaN);
    const { x, y } = spectrum.data;
    if (Number.isFinite(declared) && declared !== x.length)
      throw new ParseError({
        ...where,
        detail: `##NPOINTS= ${declared} but the block holds ${x.length} points (a damaged or cut file)`,
      });
    if (x.length !== y.length)
      throw new ParseError({ ...where, detail: 'the block holds more X than Y values' });
    const named =
      source === 'title'
        ? title
        : labelText(entry.info['SAMPLEDESCRIPTION']) || labelText(entry.info['NAMES']);
    const position = positionIn(named, rules);
    if (position === undefined)
      throw new ParseError({
        ...where,
        expected: `${describePositions(rules.plateFormat)} in the block's ${source === 'title' ? '##TITLE=' : '##SAMPLE DESCRIPTION='} (profile rule)`,
        found: named || '(empty)',
      });
    for (let j = 0; j < x.length; j++) {
      const wavelengthNm = Number((x[j] * factor).toPrecision(12));
      if (!Number.isFinite(wavelengthNm) || wavelengthNm < MIN_NM || wavelengthNm > MAX_NM)
        throw new ParseError({
          ...where,
          detail: `wavelength ${showCell(String(x[j]))} ${xUnits.toLowerCase()} is outside ${MIN_NM}–${MAX_NM} nm (missing ##FIRSTX=/##LASTX=?)`,
        });
      const a = y[j];
      set.add(
        Number.isFinite(a)
          ? { position, wavelengthNm, absorbance: Number(a.toPrecision(12)) }
          : { position, wavelengthNm, absorbance: null, flag: 'missing' },
        line ?? 0,
        where.column,
      );
    }
  }
  const top = entries[0];
  const runTitle = top && blocks.length > 1 ? (top.title ?? '') : '';
  return set.finish('jcamp_dx', { extra: runTitle ? { title: runTitle } : {} }, []);
}

function excerptTitle(title: string): string {
  return title.length > 30 ? `${title.slice(0, 30)}…` : title;
}
