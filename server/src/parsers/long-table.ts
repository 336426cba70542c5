import type { Reading } from '../analysis/types';
import { CellReader } from './cell-values';
import type { CsvRow } from './csv-rows';
import { checkRowWidth, delimiterHint, describeHeader, indexHeader } from './header-row';
import { excerpt, ParseError } from './parse-error';
import type { Delimiter, ParseRules } from './parse-rules';
import { ReadingSet, sharedValue, type ParsedRun } from './reading-set';

/** One row per reading: a header row with the profile's column names, then data rows. */
export function parseLongTable(
  rows: CsvRow[],
  file: string,
  rules: ParseRules,
  delimiter: Delimiter,
): ParsedRun {
  const [header, ...data] = rows;
  if (header === undefined) throw new ParseError({ file, detail: 'no readings: the file has no header row' });
  const index = indexHeader(header, file);
  const names = rules.columns;
  const required = { position: names.position, wavelength: names.wavelength, absorbance: names.absorbance };
  for (const name of Object.values(required)) {
    if (!index.has(name.trim().toLowerCase())) {
      throw new ParseError({
        file,
        line: header.line,
        column: name,
        expected: `a header row naming the column "${name}"`,
        detail: `the header has ${describeHeader(header)}${delimiterHint(header, delimiter)}`,
      });
    }
  }
  const col = (name: string) => index.get(name.trim().toLowerCase());
  const at = {
    position: col(names.position) as number,
    wavelength: col(names.wavelength) as number,
    absorbance: col(names.absorbance) as number,
    readTime: col(names.readTime),
    temperature: col(names.temperature),
    replicate: col(names.replicate),
  };
  const used = new Set(Object.values(at).filter((i): i is number => i !== undefined));
  const ignored = header.cells.filter((c, i) => c !== '' && !used.has(i));
  const warnings = ignored.length > 0 ? [`ignored column(s): ${excerpt(ignored.join(', '))}`] : [];

  if (data.length === 0) {
    throw new ParseError({
      file,
      line: header.line,
      detail: 'no readings: the file has a header row but no data rows',
    });
  }
  const cells = new CellReader(file, rules.decimalMark);
  const set = new ReadingSet(file);
  for (const row of data) {
    checkRowWidth(row, header.cells.length, file);
    const c = row.cells;
    row.cells.forEach((text, i) => cells.checkText(text, row.line, header.cells[i] || i + 1));
    const reading: Reading = {
      position: cells.position(c[at.position], row.line, header.cells[at.position], rules.plateFormat),
      wavelengthNm: cells.wavelengthNm(c[at.wavelength], row.line, header.cells[at.wavelength]),
      ...cells.absorbance(c[at.absorbance], row.line, header.cells[at.absorbance]),
    };
    if (at.readTime !== undefined && c[at.readTime] !== '') reading.readTime = c[at.readTime];
    if (at.temperature !== undefined && c[at.temperature] !== '') {
      reading.temperatureC = cells.temperatureC(c[at.temperature], row.line, header.cells[at.temperature]);
    }
    if (at.replicate !== undefined && c[at.replicate] !== '') {
      reading.replicate = cells.replicate(c[at.replicate], row.line, header.cells[at.replicate]);
    }
    set.add(reading, row.line);
  }
  return set.finish(
    'long_table',
    {
      temperatureC: sharedValue(set.readings.map((r) => r.temperatureC)),
      readTime: set.readings.find((r) => r.readTime !== undefined)?.readTime,
      extra: {},
    },
    warnings,
  );
}
