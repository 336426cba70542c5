import { CellReader } from './cell-values';
import type { CsvRow } from './csv-rows';
import { checkRowWidth, delimiterHint, describeHeader, indexHeader } from './header-row';
import { ParseError, showCell } from './parse-error';
import type { Delimiter, ParseRules } from './parse-rules';
import { ReadingSet, type ParsedRun } from './reading-set';

/** A wavelength column, then one absorbance column per position (the header cells name the positions). */
export function parseSpectrum(
  rows: CsvRow[],
  file: string,
  rules: ParseRules,
  delimiter: Delimiter,
): ParsedRun {
  const [header, ...data] = rows;
  if (header === undefined) throw new ParseError({ file, detail: 'no readings: the file has no header row' });
  const index = indexHeader(header, file);
  const wavelengthName = rules.spectrumWavelengthColumn;
  const wavelengthAt = index.get(wavelengthName.trim().toLowerCase());
  if (wavelengthAt === undefined) {
    throw new ParseError({
      file,
      line: header.line,
      column: wavelengthName,
      expected: `a header row naming the column "${wavelengthName}"`,
      detail: `the header has ${describeHeader(header)}${delimiterHint(header, delimiter)}`,
    });
  }
  const cells = new CellReader(file, rules.decimalMark);
  const positions = new Map<number, string>();
  const seen = new Map<string, string>();
  header.cells.forEach((text, i) => {
    if (i === wavelengthAt) return;
    if (text === '') {
      throw cells.error(
        header.line,
        i + 1,
        'a position in every header cell after the wavelength column',
        text,
      );
    }
    const position = cells.position(text, header.line, text, rules.plateFormat);
    const twin = seen.get(position);
    if (twin !== undefined) {
      throw cells.error(
        header.line,
        text,
        'each position once in the header',
        text,
        `same position as ${showCell(twin)}`,
      );
    }
    seen.set(position, text);
    positions.set(i, position);
  });
  if (positions.size === 0) {
    throw cells.error(
      header.line,
      undefined,
      'at least one position column after the wavelength column',
      header.cells.join(' '),
    );
  }
  if (data.length === 0) {
    throw new ParseError({
      file,
      line: header.line,
      detail: 'no readings: the file has a header row but no data rows',
    });
  }
  const set = new ReadingSet(file);
  for (const row of data) {
    checkRowWidth(row, header.cells.length, file);
    row.cells.forEach((text, i) => cells.checkText(text, row.line, header.cells[i] || i + 1));
    const wavelengthNm = cells.wavelengthNm(row.cells[wavelengthAt], row.line, header.cells[wavelengthAt]);
    for (const [i, position] of positions) {
      set.add(
        { position, wavelengthNm, ...cells.absorbance(row.cells[i], row.line, header.cells[i]) },
        row.line,
        header.cells[i],
      );
    }
  }
  return set.finish('spectrum', { extra: {} }, []);
}
