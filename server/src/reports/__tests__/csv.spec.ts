import { parse } from 'csv-parse/sync';
import { csvField, escapeFormula, reportToCsv, toCsv } from '../csv';
import type { BatchReport } from '../report-model';

describe('CSV writer', () => {
  it.each([
    ['=HYPERLINK("http://x")', `"'=HYPERLINK(""http://x"")"`],
    ['+1', `"'+1"`],
    ['-2+3', `"'-2+3"`],
    ['@SUM(A1)', `"'@SUM(A1)"`],
    ['\t=1+1', `"'\t=1+1"`],
    ['\r=1+1', `"'\r=1+1"`],
    ['-0.002', `"'-0.002"`],
  ])('when a text cell is %j then it is prefixed with a quote and quoted', (text, field) => {
    expect(csvField(text)).toBe(field);
  });

  it('when a cell is harmless text then it is only quoted, with its quotes doubled', () => {
    expect(csvField('STD-100uM')).toBe('"STD-100uM"');
    expect(csvField('say "hi", then\nleave')).toBe('"say ""hi"", then\nleave"');
    expect(escapeFormula('A=1')).toBe('A=1');
  });

  it('when a cell is a number then it stays a bare number, negative or not', () => {
    expect(csvField(-0.002)).toBe('-0.002');
    expect(csvField(0.1585)).toBe('0.1585');
    expect(csvField(1.5e-7)).toBe('1.5e-7');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField(null)).toBe('');
    expect(csvField(undefined)).toBe('');
    expect(csvField(true)).toBe('true');
  });

  it('when the rows are read back by a CSV parser then the text survives, escaped, and numbers stay numbers', () => {
    const hostile = ['=HYPERLINK("http://x")', '+1', '-2+3', '@SUM(A1)', 'plain, with comma'];
    const csv = toCsv([['sample_id', 'absorbance'], ...hostile.map((h, i) => [h, -0.002 * (i + 1)])]);
    expect(csv.startsWith('\uFEFF')).toBe(true);
    expect(csv.endsWith('\r\n')).toBe(true);
    const rows = parse(csv, { bom: true }) as string[][];
    expect(rows.slice(1).map((r) => r[0])).toEqual([
      `'=HYPERLINK("http://x")`,
      "'+1",
      "'-2+3",
      "'@SUM(A1)",
      'plain, with comma',
    ]);
    expect(rows.slice(1).map((r) => Number(r[1]))).toEqual([-0.002, -0.004, -0.006, -0.008, -0.01]);
    // No field of the file starts with a formula character.
    for (const row of rows)
      for (const cell of row) if (Number.isNaN(Number(cell))) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
  });

  it('when a report model is written then its details lead as # key,value lines and only the CSV columns follow', () => {
    const report: BatchReport = {
      title: 'Batch report: test',
      subtitle: '',
      verdict: null,
      footer: 'test',
      sections: [
        {
          title: 'Batch',
          details: [
            { key: 'run_id', label: 'Run id', text: 'RUN, 7', value: 'RUN, 7' },
            { key: 'wavelength_nm', label: 'Wavelength', text: '640 nm', value: 640 },
            { key: 'thresholds', label: 'Thresholds', text: 'R² ≥ 0.99', value: null, in: ['pdf'] },
          ],
          figures: [],
          tables: [],
          notes: [],
        },
        {
          title: 'Results',
          details: [],
          figures: [],
          notes: [{ text: 'A note for the CSV' }, { text: 'Only on paper', in: ['pdf'] }],
          tables: [
            {
              title: 'Results',
              columns: [
                { key: 'sample_id', header: 'Sample', width: 10 },
                { key: 'x', header: 'x', width: 10 },
                { key: 'range', header: 'Range', width: 10, in: ['pdf'] },
              ],
              rows: [
                [
                  { text: 'S1', value: 'S1' },
                  { text: '0.3', value: 0.1 + 0.2 },
                  { text: '1–2', value: null },
                ],
              ],
            },
          ],
        },
      ],
    };
    const csv = reportToCsv(report);
    expect(
      csv.startsWith('\uFEFF# Equilight batch results\r\n# run_id,"RUN, 7"\r\n# wavelength_nm,640\r\n\r\n'),
    ).toBe(true);
    expect(csv).not.toContain('thresholds');
    expect(csv).not.toContain('0.30000000000000004');
    // A reader that knows # comments gets the tables alone.
    expect(parse(csv, { bom: true, comment: '#', relax_column_count: true, skip_empty_lines: true })).toEqual(
      [['Results'], ['sample_id', 'x'], ['S1', '0.3'], ['Results notes'], ['A note for the CSV']],
    );
    // Any CSV reader reads the lead lines as two fields each.
    const plain = parse(csv, { bom: true, relax_column_count: true }) as string[][];
    expect(plain[1]).toEqual(['# run_id', 'RUN, 7']);
  });
});
