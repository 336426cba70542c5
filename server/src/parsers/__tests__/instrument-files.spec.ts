import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { isValidPosition, parseInstrumentFile, ParseError } from '../index';
import { fixture } from './load-fixture';

const good = (name: string) => fixture('good', name);

describe('long table', () => {
  it('reads every column of a plain comma file', async () => {
    const run = await parseInstrumentFile(good('long-basic.csv'), 'long-basic.csv');
    expect(run.format).toBe('long_table');
    expect(run.readings).toHaveLength(8);
    expect(run.readings[0]).toEqual({
      position: 'A1',
      wavelengthNm: 520,
      absorbance: expect.any(Number),
      readTime: '2025-03-14T09:12:11',
      temperatureC: 25,
      replicate: 1,
    });
    expect(run.readings[1].replicate).toBe(2);
    expect(run.metadata).toEqual({
      wavelengthsNm: [520],
      temperatureC: 25,
      readTime: '2025-03-14T09:12:11',
      extra: {},
    });
    expect(run.warnings).toEqual([]);
  });

  it('drops a UTF-8 byte-order mark, reads CRLF, ignores blank trailing lines and normalises positions', async () => {
    const run = await parseInstrumentFile(good('long-bom-crlf.csv'), 'long-bom-crlf.csv');
    expect(run.readings.map((r) => r.position)).toEqual(['A1', 'A2', 'B1', 'H12']);
    expect(run.readings.every((r) => r.wavelengthNm === 405)).toBe(true);
  });

  it('reads ";" with a decimal comma when the rules say so', async () => {
    const run = await parseInstrumentFile(good('long-semicolon-decimal-comma.csv'), 'x.csv', {
      decimalMark: ',',
      plateFormat: 'cuvette',
    });
    expect(run.readings).toHaveLength(6);
    expect(run.metadata.wavelengthsNm).toEqual([450, 612.5]);
    expect(run.metadata.temperatureC).toBe(21.5);
    for (const r of run.readings) expect(r.absorbance).toBeGreaterThan(0);
  });

  it('detects a tab delimiter', async () => {
    const run = await parseInstrumentFile(good('long-tab.tsv'), 'long-tab.tsv');
    expect(run.readings.map((r) => r.position)).toEqual(['D4', 'D5', 'E4', 'E5']);
  });

  it.each([',', ';', '\t'] as const)('honours an explicit delimiter %j', async (delimiter) => {
    const text =
      ['position', 'wavelength_nm', 'absorbance'].join(delimiter) +
      '\n' +
      ['A1', '520', '0.5'].join(delimiter);
    const run = await parseInstrumentFile(Buffer.from(text), 'x.csv', { delimiter });
    expect(run.readings).toEqual([{ position: 'A1', wavelengthNm: 520, absorbance: 0.5 }]);
  });

  it('reads renamed columns after skipped preamble lines, matching names case-insensitively', async () => {
    const run = await parseInstrumentFile(good('long-renamed-skip.csv'), 'renamed.csv', {
      skipLines: 3,
      columns: { position: 'well', wavelength: 'LAMBDA (nm)', absorbance: 'od' },
    });
    expect(run.readings).toHaveLength(3);
    expect(run.readings[2].position).toBe('A3');
    expect(run.warnings).toEqual(['ignored column(s): Notes']);
  });

  it('keeps saturation markers and empty cells as flagged readings without absorbance, never zero', async () => {
    const run = await parseInstrumentFile(good('long-saturation-empty.csv'), 'sat.csv');
    const byPosition = Object.fromEntries(run.readings.map((r) => [r.position, r]));
    expect(byPosition.A1).toEqual({ position: 'A1', wavelengthNm: 540, absorbance: 0.812 });
    for (const p of ['A2', 'A3', 'A4', 'A5', 'A6']) {
      expect(byPosition[p]).toMatchObject({ absorbance: null, flag: 'saturated' });
    }
    for (const p of ['A7', 'A8']) expect(byPosition[p]).toMatchObject({ absorbance: null, flag: 'missing' });
    expect(byPosition.A9.absorbance).toBe(-0.004);
    expect(run.warnings).toEqual([
      '5 saturated reading(s) kept without absorbance',
      '2 empty cell(s) kept as missing readings',
    ]);
  });

  it('reads a cuvette sequence', async () => {
    const run = await parseInstrumentFile(good('long-cuvette.csv'), 'cuv.csv', { plateFormat: 'cuvette' });
    expect(run.readings.map((r) => r.position)).toEqual(['C1', 'C2', 'C3', 'C4', 'C5', 'C6']);
  });

  it('reads latin1 and UTF-16LE files when the profile says so', async () => {
    const latin1 = await parseInstrumentFile(good('long-latin1.csv'), 'l1.csv', { encoding: 'latin1' });
    expect(latin1.readings).toHaveLength(2);
    expect(latin1.warnings).toEqual(['ignored column(s): remarque']);
    const utf16 = await parseInstrumentFile(good('long-utf16.csv'), 'u16.csv', { encoding: 'utf-16le' });
    expect(utf16.readings.map((r) => r.position)).toEqual(['B7', 'B8']);
  });

  it('warns when a latin1 profile reads what looks like UTF-8 text', async () => {
    const text = 'position,wavelength_nm,absorbance,note\nA1,520,0.4,22 °C\n';
    const run = await parseInstrumentFile(Buffer.from(text, 'utf8'), 'w.csv', { encoding: 'latin1' });
    expect(run.readings).toHaveLength(1);
    expect(run.warnings[0]).toMatch(
      /^line 2 reads "Â°": the file may be UTF-8 although the profile says latin1$/,
    );
  });

  it('accepts quoted cells and empty trailing cells', async () => {
    const run = await parseInstrumentFile(good('long-quoted-trailing.csv'), 'q.csv');
    expect(run.readings.map((r) => r.absorbance)).toEqual([0.4215, 0.398, 0.3312]);
  });

  it('names the line of a quoted cell that spans lines correctly for later rows', async () => {
    const text =
      'position,wavelength_nm,absorbance,note\nA1,520,0.1,"two\nlines"\nA2,520,0.2,x\nQ99,520,0.3,x\n';
    await expect(parseInstrumentFile(Buffer.from(text), 'm.csv')).rejects.toThrow(
      /^m\.csv line 5, column "position"/,
    );
  });

  it('reads a 384-well long table and refuses its far wells on a 96-well profile', async () => {
    const text = 'position,wavelength_nm,absorbance\nP24,520,0.3\n';
    const run = await parseInstrumentFile(Buffer.from(text), 'p.csv', { plateFormat: '384' });
    expect(run.readings[0].position).toBe('P24');
    await expect(parseInstrumentFile(Buffer.from(text), 'p.csv')).rejects.toThrow(/found "P24"/);
  });
});

describe('plate grid', () => {
  it('reads header keys and one 8×12 grid', async () => {
    const run = await parseInstrumentFile(good('grid-96-one.csv'), 'g.csv', { format: 'plate_grid' });
    expect(run.format).toBe('plate_grid');
    expect(run.readings).toHaveLength(96);
    expect(run.metadata).toEqual({
      runId: 'KB-0415',
      wavelengthsNm: [520],
      temperatureC: 25,
      readTime: '2025-03-15T10:02:00',
      extra: { operator: 'R. Oduya' },
    });
    expect(run.readings[0]).toMatchObject({ position: 'A1', wavelengthNm: 520, temperatureC: 25 });
    expect(run.readings[95].position).toBe('H12');
    expect(new Set(run.readings.map((r) => r.position)).size).toBe(96);
  });

  it('reads several wavelengths with CRLF, saturation markers and empty cells', async () => {
    const run = await parseInstrumentFile(good('grid-96-multi.csv'), 'g.csv', { format: 'plate_grid' });
    expect(run.readings).toHaveLength(3 * 96);
    expect(run.metadata.wavelengthsNm).toEqual([450, 520, 600]);
    const find = (p: string, nm: number) =>
      run.readings.find((r) => r.position === p && r.wavelengthNm === nm);
    expect(find('A1', 450)).toMatchObject({ absorbance: null, flag: 'saturated' });
    expect(find('D6', 520)).toMatchObject({ absorbance: null, flag: 'missing' });
    expect(find('H12', 600)).toMatchObject({ absorbance: null, flag: 'saturated' });
    expect(find('A1', 520)?.absorbance).toEqual(expect.any(Number));
  });

  it('reads three 16×24 grids with a BOM, ";" and a decimal comma', async () => {
    const run = await parseInstrumentFile(good('grid-384-three.csv'), 'g384.csv', {
      format: 'plate_grid',
      plateFormat: '384',
      decimalMark: ',',
    });
    expect(run.readings).toHaveLength(3 * 384);
    expect(run.metadata.wavelengthsNm).toEqual([340, 405, 492]);
    expect(run.metadata.temperatureC).toBe(37);
    expect(run.readings.at(-1)?.position).toBe('P24');
    expect(run.readings.every((r) => r.absorbance !== null && r.absorbance > 0)).toBe(true);
  });

  it('ignores a value without a key, with a warning', async () => {
    const grid = [
      ',1,2,3,4,5,6,7,8,9,10,11,12',
      ...'ABCDEFGH'.split('').map((r) => `${r}${',0.1'.repeat(12)}`),
    ];
    const text = ['wavelength_nm,520', ',Plate 1 of 1', ...grid].join('\n');
    const run = await parseInstrumentFile(Buffer.from(text), 'g.csv', { format: 'plate_grid' });
    expect(run.readings).toHaveLength(96);
    expect(run.warnings).toEqual(['line 2: a value without a key was ignored']);
  });

  it('uses the default wavelength of the profile for a grid without a wavelength line (tab file)', async () => {
    const run = await parseInstrumentFile(good('grid-96-default-wavelength.tsv'), 'g.tsv', {
      format: 'plate_grid',
      defaultWavelengthNm: 595,
    });
    expect(run.metadata.wavelengthsNm).toEqual([595]);
    expect(run.readings).toHaveLength(96);
  });
});

describe('spectrum', () => {
  it('reads one absorbance column per position', async () => {
    const run = await parseInstrumentFile(good('spectrum-96.csv'), 's.csv', { format: 'spectrum' });
    expect(run.format).toBe('spectrum');
    expect(run.readings).toHaveLength(7 * 4);
    expect(run.metadata.wavelengthsNm).toEqual([400, 450, 500, 550, 600, 650, 700]);
    expect(run.readings.slice(0, 4).map((r) => r.position)).toEqual(['A1', 'A2', 'B1', 'B2']);
  });

  it('reads a cuvette spectrum with ";", a decimal comma, a marker and an empty cell', async () => {
    const run = await parseInstrumentFile(good('spectrum-cuvette-semicolon.csv'), 's.csv', {
      format: 'spectrum',
      plateFormat: 'cuvette',
      decimalMark: ',',
    });
    expect(run.metadata.wavelengthsNm).toEqual([380, 390.5, 401, 410]);
    expect(run.readings.filter((r) => r.wavelengthNm === 410)).toEqual([
      { position: 'C1', wavelengthNm: 410, absorbance: null, flag: 'saturated' },
      { position: 'C2', wavelengthNm: 410, absorbance: null, flag: 'missing' },
      { position: 'C3', wavelengthNm: 410, absorbance: 0.1234 },
    ]);
  });

  it('uses a renamed wavelength column', async () => {
    const text = 'Lambda,A1\n400,0.2\n';
    const run = await parseInstrumentFile(Buffer.from(text), 's.csv', {
      format: 'spectrum',
      spectrumWavelengthColumn: 'lambda',
    });
    expect(run.readings).toEqual([{ position: 'A1', wavelengthNm: 400, absorbance: 0.2 }]);
  });
});

describe('JCAMP-DX', () => {
  it('reads a single block in DIF/DUP compression, the position from the sample description', async () => {
    // Compressed forms per McDonald R.S. & Wilks P.A., Appl. Spectrosc. 42 (1988) 151 (JCAMP-DX):
    // "A00" is SQZ +100, K/L are DIF +2/+3, "%" a difference of 0, "T" DUP ×2, "k" DIF −2; the last line's
    // Y is the Y check of the line before. So Y = 100, 102, 105, 105, 105, 103 (× YFACTOR 0.001).
    const run = await parseInstrumentFile(good('jcamp-dif-sample-description.jdx'), 'b3.jdx', {
      format: 'jcamp_dx',
      jcampPositionFrom: 'sample_description',
    });
    expect(run.format).toBe('jcamp_dx');
    expect(run.metadata.wavelengthsNm).toEqual([400, 402, 404, 406, 408, 410]);
    expect(run.readings.map((r) => r.position)).toEqual(Array(6).fill('B3'));
    expect(run.readings.map((r) => r.absorbance)).toEqual([0.1, 0.102, 0.105, 0.105, 0.105, 0.103]);
  });

  it('refuses the same file when the profile reads the position from the title', async () => {
    const error = await parseInstrumentFile(good('jcamp-dif-sample-description.jdx'), 'b3.jdx', {
      format: 'jcamp_dx',
    }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ParseError);
    expect((error as ParseError).message).toMatch(
      /^b3\.jdx line 1, column "block dye titration": expected a 96-well position .* in the block's ##TITLE=/,
    );
  });

  it('reads linked blocks of a cuvette run, micrometres as nanometres', async () => {
    const run = await parseInstrumentFile(good('jcamp-linked-cuvettes.jdx'), 'run.jdx', {
      format: 'jcamp_dx',
      plateFormat: 'cuvette',
    });
    expect(run.metadata).toEqual({
      wavelengthsNm: [500, 502, 504],
      extra: { title: 'invented cuvette run' },
    });
    expect(run.readings).toEqual([
      { position: 'C1', wavelengthNm: 500, absorbance: 0.012 },
      { position: 'C1', wavelengthNm: 502, absorbance: 0.011 },
      { position: 'C1', wavelengthNm: 504, absorbance: 0.01 },
      { position: 'C2', wavelengthNm: 500, absorbance: 0.512 },
      { position: 'C2', wavelengthNm: 502, absorbance: 0.611 },
      { position: 'C2', wavelengthNm: 504, absorbance: 0.71 },
    ]);
  });

  it('reads the invented sample spectra as the spectrum CSV holds them', async () => {
    const dir = resolve(__dirname, '../../../../samples/analysis');
    const rules = { plateFormat: 'cuvette' as const };
    const jdx = await parseInstrumentFile(readFileSync(`${dir}/spectra.jdx`), 'spectra.jdx', {
      ...rules,
      format: 'jcamp_dx',
    });
    const csv = await parseInstrumentFile(readFileSync(`${dir}/spectra.csv`), 'spectra.csv', {
      ...rules,
      format: 'spectrum',
    });
    const key = (r: { position: string; wavelengthNm: number }) => `${r.position}@${r.wavelengthNm}`;
    const fromCsv = new Map(csv.readings.map((r) => [key(r), r.absorbance]));
    expect(jdx.readings).toHaveLength(csv.readings.length);
    for (const r of jdx.readings) expect(r.absorbance).toBeCloseTo(fromCsv.get(key(r)) as number, 10);
  });
});

describe('file names', () => {
  it('uses the file name only in messages, even when it looks like a path', async () => {
    const name = '../../etc/passwd';
    const run = await parseInstrumentFile(good('long-basic.csv'), name);
    expect(run.readings).toHaveLength(8);
    const error = await parseInstrumentFile(
      Buffer.from('position,wavelength_nm,absorbance\nQ99,520,1\n'),
      name,
    ).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ParseError);
    expect((error as ParseError).file).toBe(name);
    expect((error as ParseError).message.startsWith(`${name} line 2, column "position"`)).toBe(true);
  });
});

describe('isValidPosition', () => {
  it.each([
    ['A1', '96', true],
    ['h12', '96', true],
    ['a01', '96', true],
    ['I1', '96', false],
    ['A13', '96', false],
    ['A0', '96', false],
    ['P24', '384', true],
    ['Q1', '384', false],
    ['A25', '384', false],
    ['C1', 'cuvette', true],
    ['c017', 'cuvette', true],
    ['A1', 'cuvette', false],
    ['C0', 'cuvette', false],
    ['AA1', '96', false],
    ['1A', '96', false],
    ['', '96', false],
  ] as const)('%j on %s → %s', (position, format, valid) => {
    expect(isValidPosition(position, format)).toBe(valid);
  });
});
