import { parseManifestCsv, ParseError, type ManifestProblem } from '../index';
import { fixture } from './load-fixture';

const manifest = (name: string) => fixture('manifest', name);

describe('manifest: good files', () => {
  it('reads every role and column', async () => {
    const { samples, problems } = await parseManifestCsv(manifest('good-full.csv'), 'good-full.csv');
    expect(problems).toEqual([]);
    expect(samples).toHaveLength(9);
    expect(samples[0]).toEqual({
      position: 'A1',
      sampleId: 'KB-BLK-1',
      role: 'blank',
      replicateGroup: 'blk',
    });
    expect(samples[2]).toEqual({
      position: 'B1',
      sampleId: 'KB-STD-1',
      role: 'standard',
      concentrationM: 2e-5,
    });
    expect(samples[4]).toEqual({ position: 'C1', sampleId: 'KB-UNK-1', role: 'unknown', dilutionFactor: 5 });
    expect(samples[5].dilutionFactor).toBe(1);
    expect(samples[6]).toEqual({
      position: 'D1',
      sampleId: 'KB-MIX-1',
      role: 'mixture',
      stockAM: 0.002,
      volumeAMl: 1,
      stockBM: 0.002,
      volumeBMl: 4,
      totalVolumeMl: 10,
      replicateGroup: 'mix1',
    });
    expect(samples[8].role).toBe('control');
  });

  it('reads ";" with a BOM, CRLF, upper-case names and decimal commas to the same samples', async () => {
    const plain = await parseManifestCsv(manifest('good-full.csv'), 'a.csv');
    const semicolon = await parseManifestCsv(manifest('good-semicolon-bom-crlf.csv'), 'b.csv');
    expect(semicolon).toEqual(plain);
  });

  it('reads a tab file whose optional columns are absent', async () => {
    const { samples, problems } = await parseManifestCsv(manifest('good-tab-minimal.tsv'), 'm.tsv');
    expect(problems).toEqual([]);
    expect(samples.map((s) => s.position)).toEqual(['C1', 'C2', 'C3']);
    expect(samples[1].concentrationM).toBe(1.5e-4);
  });
});

type Expected = Pick<ManifestProblem, 'row' | 'column'> & { message: RegExp };

/** Each broken manifest and every problem it must report, with row (file line) and column. */
const BROKEN: [file: string, problems: Expected[]][] = [
  [
    'bad-unknown-role.csv',
    [{ row: 2, column: 'role', message: /unknown role "sample": expected one of blank/ }],
  ],
  [
    'bad-standard-no-concentration.csv',
    [{ row: 2, column: 'concentration_M', message: /missing concentration_M: a standard needs it/ }],
  ],
  [
    'bad-mixture-no-stock.csv',
    [{ row: 2, column: 'stock_b_M', message: /missing stock_b_M: a mixture needs it/ }],
  ],
  ['bad-mixture-no-volume.csv', [{ row: 2, column: 'volume_a_mL', message: /missing volume_a_mL/ }]],
  [
    'bad-negative-number.csv',
    [{ row: 2, column: 'concentration_M', message: /must not be negative, found -1e-5/ }],
  ],
  [
    'bad-non-numeric.csv',
    [{ row: 2, column: 'dilution_factor', message: /expected a number, found "five"/ }],
  ],
  [
    'bad-volumes-exceed-total.csv',
    [
      {
        row: 2,
        column: 'total_volume_mL',
        message: /volume_a_mL \+ volume_b_mL = 11 mL exceeds total_volume_mL 10 mL/,
      },
    ],
  ],
  [
    'bad-duplicate-position.csv',
    [{ row: 4, column: 'position', message: /duplicate position A1: already on row 2/ }],
  ],
  [
    'bad-bad-position.csv',
    [{ row: 2, column: 'position', message: /expected a position such as A1…P24 .*found "A-1"/ }],
  ],
  ['bad-position-off-plate.csv', [{ row: 2, column: 'position', message: /found "Q99"/ }]],
  ['bad-missing-sample-id.csv', [{ row: 2, column: 'sample_id', message: /^missing sample_id$/ }]],
  ['bad-missing-role.csv', [{ row: 2, column: 'role', message: /^missing role$/ }]],
  [
    'bad-unknown-column.csv',
    [{ row: 1, column: 'colour', message: /unknown column: expected only position, sample_id/ }],
  ],
  ['bad-missing-role-column.csv', [{ row: 1, column: 'role', message: /required column is missing/ }]],
  [
    'bad-formula-sample-id.csv',
    [{ row: 2, column: 'sample_id', message: /formula-like cell "=HYPERLINK\("x"\)" is refused/ }],
  ],
  ['bad-ragged-row.csv', [{ row: 3, column: '', message: /the row has 3 cells, the header 11/ }]],
  [
    'bad-zero-dilution.csv',
    [{ row: 2, column: 'dilution_factor', message: /must be greater than 0, found 0/ }],
  ],
  [
    'bad-duplicate-column.csv',
    [{ row: 1, column: 'Sample_ID', message: /the header names this column twice/ }],
  ],
  [
    'bad-many-problems.csv',
    [
      { row: 2, column: 'concentration_M', message: /missing concentration_M/ },
      { row: 3, column: 'sample_id', message: /missing sample_id/ },
      { row: 4, column: 'volume_a_mL', message: /expected a number, found "abc"/ },
      { row: 5, column: 'position', message: /duplicate position A1: already on row 2/ },
      { row: 5, column: 'role', message: /unknown role "reagent"/ },
    ],
  ],
];

describe('manifest: broken files report every problem with row and column', () => {
  it.each(BROKEN)('%s', async (file, expected) => {
    const { problems } = await parseManifestCsv(manifest(file), file);
    expect(problems).toHaveLength(expected.length);
    expected.forEach((e, i) => {
      expect(problems[i]).toMatchObject({ row: e.row, column: e.column });
      expect(problems[i].message).toMatch(e.message);
    });
  });

  it('turns only the rows without problems into samples', async () => {
    const { samples } = await parseManifestCsv(manifest('bad-duplicate-position.csv'), 'm.csv');
    expect(samples.map((s) => s.sampleId)).toEqual(['S1', 'S2']);
  });

  it('when a row lies off the plate of its layout then it is a problem of that row, not a sample', async () => {
    const text = 'position,sample_id,role\nA1,B1,blank\nI3,U9,unknown\nA13,U10,unknown\nH12,U11,unknown\n';
    const { problems, samples } = await parseManifestCsv(Buffer.from(text), 'm.csv', { format: '96' });
    // a 96-well plate has rows A–H and columns 1–12 (ANSI SLAS 4-2004 microplate well positions, from memory)
    expect(problems).toEqual([
      { row: 3, column: 'position', message: 'I3 is off the plate: expected a 96-well position A1…H12' },
      { row: 4, column: 'position', message: 'A13 is off the plate: expected a 96-well position A1…H12' },
    ]);
    expect(samples.map((s) => s.position)).toEqual(['A1', 'H12']);
    // the same rows are fine on a 384-well plate, and without a plate only the syntax is checked
    expect((await parseManifestCsv(Buffer.from(text), 'm.csv', { format: '384' })).problems).toEqual([]);
    expect((await parseManifestCsv(Buffer.from(text), 'm.csv')).problems).toEqual([]);
  });

  it('when a cuvette lies past the end of the sequence or is a well then it is a problem of its row', async () => {
    const text = 'position,sample_id,role\nC1,B1,blank\nC31,U1,unknown\nA1,U2,unknown\n';
    const { problems } = await parseManifestCsv(Buffer.from(text), 'm.csv', {
      format: 'cuvette',
      cuvetteCount: 30,
    });
    expect(problems.map((p) => [p.row, p.message])).toEqual([
      [3, 'C31 is off the sequence of 30 cuvettes (C1…C30)'],
      [4, 'A1 is not a cuvette position: expected a cuvette position C1, C2, …'],
    ]);
  });

  it('accepts volumes that add up exactly to the total', async () => {
    const text =
      'position,sample_id,role,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL\nA1,M,mixture,1,0.1,1,0.2,0.3\n';
    const { problems } = await parseManifestCsv(Buffer.from(text), 'm.csv');
    expect(problems).toEqual([]);
  });
});

describe('manifest: files that are not a manifest throw', () => {
  it.each([
    ['empty', Buffer.alloc(0), /^e\.csv: the file is empty/],
    ['binary', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00, 0x08]), /binary data/],
    ['blank lines', Buffer.from('\n\n'), /no samples: the file has no header row/],
    [
      'only a header',
      Buffer.from('position,sample_id,role\n'),
      /^e\.csv line 1: no samples: .*no sample rows/,
    ],
    [
      'invalid UTF-8',
      Buffer.from('position,sample_id,role\nA1,\xb5-7,blank\n', 'latin1'),
      /line 2: the bytes are not valid UTF-8/,
    ],
  ])('%s', async (_name, content, message) => {
    const error = await parseManifestCsv(content, 'e.csv').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ParseError);
    expect((error as Error).message).toMatch(message);
  });
});
