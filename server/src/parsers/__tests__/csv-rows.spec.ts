import { parse } from 'csv-parse/sync';
import { readCsvRows } from '../csv-rows';
import type { Delimiter } from '../parse-rules';

/**
 * The reference: csv-parse (a general-purpose CSV library) with the options Equilight gives it, and the
 * same rule on top (records with a non-empty cell, trimmed, with the line they start on).
 */
function referenceRows(text: string, delimiter: Delimiter, skipLines: number) {
  const records = parse(text.replace(/\r\n?/g, '\n'), {
    delimiter,
    from_line: skipLines + 1,
    relax_column_count: true,
    relax_quotes: true,
    skip_empty_lines: true,
    info: true,
  }) as unknown as { record: string[]; info: { lines: number } }[];
  return records
    .map((r) => ({ line: r.info.lines, cells: r.record.map((c) => c.trim()) }))
    .filter((r) => r.cells.some((c) => c !== ''));
}

/** A small deterministic generator (mulberry32), so a failure can be replayed. */
function random(seed: number): () => number {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const PIECES = [
  '0.123',
  'A1',
  ' 7 ',
  '',
  'run_id',
  'µmol/L',
  '  ',
  '1,5',
  'x;y',
  'tab\there',
  '-0.004',
  'BLK-1',
];
const ENDS = ['\n', '\r\n', '\r', '\n\n', '\r\n\r\n'];

function quoteFreeText(next: () => number, delimiter: Delimiter): string {
  const lines: string[] = [];
  const count = 1 + Math.floor(next() * 12);
  for (let i = 0; i < count; i++) {
    const cells = Array.from(
      { length: Math.floor(next() * 6) },
      () => PIECES[Math.floor(next() * PIECES.length)],
    );
    lines.push(cells.join(delimiter) + ENDS[Math.floor(next() * ENDS.length)]);
  }
  return lines.join('');
}

describe('reading delimited text into rows', () => {
  it('when a text has no quotes then the rows are those csv-parse gives, for 3,000 generated texts', async () => {
    const next = random(20261202);
    for (let n = 0; n < 3000; n++) {
      const delimiter = ([',', ';', '\t'] as const)[n % 3];
      const text = quoteFreeText(next, delimiter);
      const skipLines = Math.floor(next() * 3);
      const ours = await readCsvRows(text, { file: 'generated.csv', delimiter, skipLines });
      expect([n, JSON.stringify(text), ours]).toEqual([
        n,
        JSON.stringify(text),
        referenceRows(text, delimiter, skipLines),
      ]);
    }
  });

  it('when header lines are shorter than the rows then every row is kept with its own line number', async () => {
    const text = 'run_id,R-7\ntemperature_c,25.0\n\n,1,2,3\nA,0.1,0.2,0.3\nB,0.4,0.5,0.6\n';
    expect(await readCsvRows(text, { file: 'plate.csv', delimiter: ',', skipLines: 0 })).toEqual([
      { line: 1, cells: ['run_id', 'R-7'] },
      { line: 2, cells: ['temperature_c', '25.0'] },
      { line: 4, cells: ['', '1', '2', '3'] },
      { line: 5, cells: ['A', '0.1', '0.2', '0.3'] },
      { line: 6, cells: ['B', '0.4', '0.5', '0.6'] },
    ]);
  });

  it('when cells are quoted then csv-parse reads them: delimiters and line breaks inside quotes stay in the cell', async () => {
    const text = 'sample,note\nS-1,"diluted 1:10, twice"\nS-2,"two\nlines"\nS-3,plain\n';
    expect(await readCsvRows(text, { file: 'manifest.csv', delimiter: ',', skipLines: 0 })).toEqual([
      { line: 1, cells: ['sample', 'note'] },
      { line: 2, cells: ['S-1', 'diluted 1:10, twice'] },
      { line: 3, cells: ['S-2', 'two\nlines'] },
      { line: 5, cells: ['S-3', 'plain'] },
    ]);
  });

  it('when a cell is far longer than any export holds then the file is refused as csv-parse refuses it', async () => {
    const text = `a,b\n1,${'9'.repeat(70_000)}\n`;
    await expect(readCsvRows(text, { file: 'long.csv', delimiter: ',', skipLines: 0 })).rejects.toThrow(
      /too long/,
    );
    const wide = `a,b\n${'1,'.repeat(40_000)}1\n`;
    const rows = await readCsvRows(wide, { file: 'wide.csv', delimiter: ',', skipLines: 0 });
    expect(rows.map((r) => r.cells.length)).toEqual([2, 40_001]);
  });
});
