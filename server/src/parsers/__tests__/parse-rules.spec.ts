import fc from 'fast-check';
import {
  DEFAULT_PARSE_RULES,
  parseInstrumentFile,
  ParseError,
  resolveParseRules,
  type Reading,
} from '../index';

describe('resolveParseRules', () => {
  it('returns the documented defaults', () => {
    expect(resolveParseRules()).toEqual({
      format: 'long_table',
      delimiter: 'auto',
      decimalMark: '.',
      encoding: 'utf-8',
      skipLines: 0,
      columns: {
        position: 'position',
        wavelength: 'wavelength_nm',
        absorbance: 'absorbance',
        readTime: 'read_time',
        temperature: 'temperature_c',
        replicate: 'replicate',
      },
      spectrumWavelengthColumn: 'wavelength_nm',
      jcampPositionFrom: 'title',
      plateFormat: '96',
    });
    expect(resolveParseRules()).toEqual(DEFAULT_PARSE_RULES);
  });

  it('merges renamed columns into the defaults and ignores undefined or blank entries', () => {
    const rules = resolveParseRules({ columns: { absorbance: 'OD', position: '' }, skipLines: undefined });
    expect(rules.columns.absorbance).toBe('OD');
    expect(rules.columns.position).toBe('position');
    expect(rules.skipLines).toBe(0);
  });

  it.each([
    [{ decimalMark: ',', delimiter: ',' }, /decimal comma needs a ";" or tab delimiter/],
    [{ skipLines: -1 }, /lines to skip must be a whole number/],
    [{ skipLines: 1.5 }, /lines to skip/],
    [{ plateFormat: 48 }, /unknown plate format "48"/],
    [{ encoding: 'utf-32' }, /unknown encoding "utf-32"/],
    [{ format: 'xml' }, /unknown file format "xml"/],
    [{ delimiter: '|' }, /unknown delimiter "\|"/],
    [{ defaultWavelengthNm: -5 }, /default wavelength must be a positive number/],
    [{ columns: { absorbance: 'Position' } }, /two long-table columns have the same name/],
  ])('refuses %j', (partial, message) => {
    const attempt = () => resolveParseRules(partial as never);
    expect(attempt).toThrow(ParseError);
    expect(attempt).toThrow(message);
  });

  it('refuses a plate grid on a cuvette profile', async () => {
    await expect(
      parseInstrumentFile(Buffer.from(',1\nA,0.1\n'), 'g.csv', {
        format: 'plate_grid',
        plateFormat: 'cuvette',
      }),
    ).rejects.toThrow(/plate grids need a 96- or 384-well plate format/);
  });
});

describe('long tables written any allowed way read back the same', () => {
  const reading = fc.record({
    row: fc.integer({ min: 0, max: 7 }),
    column: fc.integer({ min: 1, max: 12 }),
    wavelengthNm: fc.integer({ min: 300, max: 900 }),
    absorbance: fc.oneof(
      fc.integer({ min: -500, max: 4000 }).map((n) => n / 1000),
      fc.constantFrom(null, 'OVER', '*****'),
    ),
  });
  const style = fc.record({
    delimiter: fc.constantFrom(',', ';', '\t'),
    decimalComma: fc.boolean(),
    bom: fc.boolean(),
    lineEnd: fc.constantFrom('\n', '\r\n'),
    blankTail: fc.nat({ max: 3 }),
    lowerCaseWells: fc.boolean(),
    paddedWells: fc.boolean(),
  });

  it('for every delimiter, decimal mark, BOM, line end, position spelling and marker', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.uniqueArray(reading, {
          minLength: 1,
          maxLength: 30,
          selector: (r) => `${r.row}|${r.column}|${r.wavelengthNm}`,
        }),
        style,
        async (rows, s) => {
          const decimalComma = s.decimalComma && s.delimiter !== ',';
          const lines = [['position', 'wavelength_nm', 'absorbance'].join(s.delimiter)];
          const expected: Reading[] = [];
          for (const r of rows) {
            const letter = String.fromCharCode(65 + r.row);
            const well = `${s.lowerCaseWells ? letter.toLowerCase() : letter}${s.paddedWells ? String(r.column).padStart(2, '0') : r.column}`;
            const cell =
              r.absorbance === null
                ? ''
                : typeof r.absorbance === 'string'
                  ? r.absorbance
                  : String(r.absorbance);
            lines.push(
              [well, String(r.wavelengthNm), decimalComma ? cell.replace('.', ',') : cell].join(s.delimiter),
            );
            const position = `${letter}${r.column}`;
            if (r.absorbance === null)
              expected.push({ position, wavelengthNm: r.wavelengthNm, absorbance: null, flag: 'missing' });
            else if (typeof r.absorbance === 'string') {
              expected.push({ position, wavelengthNm: r.wavelengthNm, absorbance: null, flag: 'saturated' });
            } else expected.push({ position, wavelengthNm: r.wavelengthNm, absorbance: r.absorbance });
          }
          const text = (s.bom ? '\ufeff' : '') + lines.join(s.lineEnd) + s.lineEnd.repeat(s.blankTail);
          const run = await parseInstrumentFile(Buffer.from(text), 'p.csv', {
            decimalMark: decimalComma ? ',' : '.',
          });
          expect(run.readings).toEqual(expected);
        },
      ),
      { numRuns: 150, seed: 20250314 },
    );
  });
});
