import type { ParseRulesInput } from '../index';

const GRID: ParseRulesInput = { format: 'plate_grid' };
const SPECTRUM: ParseRulesInput = { format: 'spectrum' };
const JCAMP: ParseRulesInput = { format: 'jcamp_dx' };

/** Every file of fixtures/bad, the rules it is read with, and the message it must give. */
export const CORPUS: [file: string, rules: ParseRulesInput, message: RegExp][] = [
  ['empty.csv', {}, /^empty\.csv: the file is empty: no readings$/],
  ['blank-lines-only.csv', {}, /: no readings: the file has no data$/],
  ['only-header.csv', {}, /only-header\.csv line 1: no readings: the file has a header row but no data rows/],
  ['only-keys-no-grid.csv', GRID, /no readings: expected a grid header line/],
  ['binary-png.csv', {}, /binary-png\.csv line 3: the file contains binary data \(NUL bytes\)/],
  ['binary-zip.csv', {}, /line 1: the file contains binary data/],
  ['invalid-utf8.csv', {}, /invalid-utf8\.csv line 3: the bytes are not valid UTF-8.*latin1/],
  ['utf16-declared-utf8.csv', {}, /looks like UTF-16 text but the profile says utf-8/],
  ['utf8-declared-utf16-even.csv', { encoding: 'utf-16le' }, /does not read as UTF-16LE/],
  ['utf16be.csv', {}, /UTF-16 big-endian text: expected utf-8, latin1 or utf-16le/],
  [
    'utf8-bom-declared-latin1.csv',
    { encoding: 'latin1' },
    /UTF-8 byte-order mark but the profile says latin1/,
  ],
  ['utf8-declared-utf16-odd.csv', { encoding: 'utf-16le' }, /odd number of bytes: expected UTF-16LE text/],
  [
    'utf8-bom-declared-utf16.csv',
    { encoding: 'utf-16le' },
    /UTF-8 byte-order mark but the profile says utf-16le/,
  ],
  ['truncated-quote.csv', {}, /truncated-quote\.csv line 3: a quoted cell is never closed.*truncated/],
  [
    'truncated-row.csv',
    {},
    /truncated-row\.csv line 4: expected 3 cells like the header row, found "2 cells"/,
  ],
  [
    'truncated-grid.csv',
    GRID,
    /line 7, column 1: expected row F of the grid that starts on line 2.*5 of 8 rows/,
  ],
  [
    'wrong-delimiter-semicolon.csv',
    { delimiter: ',' },
    /line 1, column "position": .*looks ";"-delimited but the profile says ","/,
  ],
  ['wrong-delimiter-tab.csv', { delimiter: ';' }, /looks tab-delimited but the profile says ";"/],
  [
    'ragged-long-row.csv',
    {},
    /ragged-long-row\.csv line 3: expected 3 cells.*found "4 cells" \(ragged row\)/,
  ],
  ['ragged-short-row.csv', {}, /line 3: expected 3 cells.*found "2 cells" \(ragged row\)/],
  [
    'letters-in-absorbance.csv',
    { decimalMark: ',' },
    /letters-in-absorbance\.csv line 3, column "absorbance": expected an absorbance .*found "1,2x"/,
  ],
  [
    'letters-in-wavelength.csv',
    {},
    /line 2, column "wavelength_nm": expected a wavelength in nm .*found "52O"/,
  ],
  [
    'decimal-comma-undeclared.csv',
    {},
    /line 2, column "absorbance": .*found "0,41" \(the profile's decimal mark is "\."\)/,
  ],
  [
    'unknown-position-q99.csv',
    {},
    /line 3, column "position": expected a 96-well position A1…H12, found "Q99"/,
  ],
  [
    'position-outside-96.csv',
    {},
    /line 2, column "position": .*found "I1" \(no such position on a 96-well plate\)/,
  ],
  ['position-bad-syntax.csv', {}, /line 2, column "position": expected a 96-well position .*found "well 5"/],
  [
    'plate-position-on-cuvette.csv',
    { plateFormat: 'cuvette' },
    /line 3, column "position": expected a cuvette position C1, C2, …, found "A1"/,
  ],
  ['duplicate-position.csv', {}, /line 4: duplicate reading for A1 at 520 nm \(first on line 2\)/],
  ['duplicate-after-normalising.csv', {}, /line 3: duplicate reading for A1 at 520 nm \(first on line 2\)/],
  [
    'duplicate-grid-wavelength.csv',
    GRID,
    /line 12: .*would repeat 520 nm, already read by the grid on line 2/,
  ],
  ['formula-hyperlink.csv', {}, /line 2, column "absorbance": .*found "=HYPERLINK.*formula-like/],
  ['formula-plus.csv', {}, /line 2, column "absorbance": .*found "\+SUM\(1;2\)".*formula-like/],
  ['formula-at-position.csv', {}, /line 2, column "position": .*found "@A1".*formula-like/],
  ['formula-minus.csv', {}, /line 2, column "absorbance": .*found "-2\+3\+cmd\|x"/],
  [
    'formula-in-grid-key.csv',
    GRID,
    /line 1, column 2: expected a plain value, found "=cmd\|x".*formula-like/,
  ],
  [
    'absorbance-too-high.csv',
    {},
    /line 2, column "absorbance": expected an absorbance from -1 to 10, found "12\.5"/,
  ],
  [
    'absorbance-too-low.csv',
    {},
    /line 2, column "absorbance": expected an absorbance from -1 to 10, found "-3"/,
  ],
  [
    'wavelength-out-of-range.csv',
    {},
    /line 2, column "wavelength_nm": expected a wavelength in nm .*found "45000"/,
  ],
  [
    'missing-absorbance-column.csv',
    {},
    /line 1, column "absorbance": expected a header row naming the column/,
  ],
  ['duplicate-header.csv', {}, /line 1, column "Absorbance": the header names this column twice/],
  [
    'grid-missing-column.csv',
    GRID,
    /line 5, column 12: expected 12 values after the row letter.*missing columns/,
  ],
  ['grid-missing-row.csv', GRID, /line 5, column 1: expected row C, found "D"/],
  [
    'grid-384-in-96-profile.csv',
    GRID,
    /line 2: expected a grid of 8×12 for a 96-well profile, found "24 columns"/,
  ],
  ['grid-no-wavelength.csv', GRID, /line 2: expected a "wavelength_nm" line before the grid/],
  ['grid-bad-header.csv', GRID, /line 2: expected a grid header of column numbers 1…12 or 1…24/],
  ['grid-row-without-header.csv', GRID, /line 2: .*a grid row with no grid header line before it/],
  ['grid-letters-in-cell.csv', GRID, /line 5, column 7: expected an absorbance .*found "0\.4l2"/],
  [
    'spectrum-no-wavelength-column.csv',
    SPECTRUM,
    /line 1, column "wavelength_nm": expected a header row naming/,
  ],
  ['spectrum-bad-position.csv', SPECTRUM, /line 1, column "Z9": expected a 96-well position/],
  [
    'spectrum-duplicate-position.csv',
    SPECTRUM,
    /line 1, column "a01": expected each position once.*same position as "A1"/,
  ],
  [
    'spectrum-duplicate-wavelength.csv',
    SPECTRUM,
    /line 4, column "A1": duplicate reading for A1 at 400 nm \(first on line 2\)/,
  ],
  ['bad-replicate.csv', {}, /line 2, column "replicate": expected a replicate number 1, 2, …, found "first"/],
  ['bad-temperature.csv', {}, /line 2, column "temperature_c": expected a temperature in °C .*found "900"/],
  ['skip-past-end.csv', { skipLines: 5 }, /no readings: the file has no data after skipping 5 line\(s\)/],
  ['stray-quote.csv', {}, /line 2, column "absorbance": expected an absorbance .*found "0\.4"1"/],
  ['quote-then-text.csv', {}, /line 2, column "absorbance": expected an absorbance .*found ""0\.41"x"/],
  [
    'html-error-page.csv',
    {},
    /line 1, column "position": expected a header row naming the column "position"/,
  ],
  ['prose-junk.csv', {}, /line 1, column "position": expected a header row naming .*"Dear colleagues"/],
  // JCAMP-DX (profile format jcamp_dx).
  [
    'jcamp-csv-content.jdx',
    JCAMP,
    /^jcamp-csv-content\.jdx: expected a JCAMP-DX file: .*found "position,wavelength_nm/,
  ],
  ['jcamp-truncated.jdx', JCAMP, /the JCAMP-DX file ends before its "##END=" \(cut off\?\)/],
  [
    'jcamp-infrared.jdx',
    JCAMP,
    /line 1, column "block A1": expected ##DATA TYPE= UV\/VIS SPECTRUM, found "INFRARED/,
  ],
  ['jcamp-transmittance.jdx', JCAMP, /expected ##YUNITS= ABSORBANCE, found "TRANSMITTANCE"/],
  ['jcamp-wavenumbers.jdx', JCAMP, /expected ##XUNITS= NANOMETERS \(or MICROMETERS\), found "1\/CM"/],
  [
    'jcamp-npoints-mismatch.jdx',
    JCAMP,
    /##NPOINTS= 6 but the block holds 3 points \(a damaged or cut file\)/,
  ],
  ['jcamp-no-data.jdx', JCAMP, /no spectrum data: expected ##XYDATA= \(X\+\+\(Y\.\.Y\)\)/],
  ['jcamp-no-firstx.jdx', JCAMP, /wavelength "0" nanometers is outside 100–3300 nm \(missing ##FIRSTX=/],
  [
    'jcamp-no-position.jdx',
    JCAMP,
    /column "block dye run 7": expected a 96-well position A1…H12 in the block's ##TITLE=/,
  ],
  ['jcamp-position-outside-plate.jdx', JCAMP, /expected a 96-well position A1…H12 .*found "Q99"/],
  [
    'jcamp-duplicate-position.jdx',
    JCAMP,
    /line 19, column "block A1 again": duplicate reading for A1 at 400 nm \(first on line 5\)/,
  ],
];
