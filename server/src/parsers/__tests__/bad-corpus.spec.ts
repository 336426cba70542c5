import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { MAX_FILE_BYTES, parseInstrumentFile, ParseError, type ParseRulesInput } from '../index';
import { junkBytes, writeTempFiles } from './generated-junk';
import { FIXTURES } from './load-fixture';

import { CORPUS } from './bad-corpus-table';

async function parseError(content: Buffer, file: string, rules: ParseRulesInput): Promise<ParseError> {
  const outcome = await parseInstrumentFile(content, file, rules).then(
    (run) => run,
    (e: unknown) => e,
  );
  if (!(outcome instanceof ParseError)) {
    throw new Error(
      `${file}: expected a ParseError, got ${outcome instanceof Error ? outcome.message : 'readings'}`,
    );
  }
  return outcome;
}

describe('bad-input corpus', () => {
  it('has at least 40 committed files, each listed exactly once below', () => {
    const files = readdirSync(join(FIXTURES, 'bad')).sort();
    expect(files.length).toBeGreaterThanOrEqual(40);
    expect(CORPUS.map(([f]) => f).sort()).toEqual(files);
  });

  it.each(CORPUS)('%s is refused with its own message', async (file, rules, message) => {
    const error = await parseError(readFileSync(join(FIXTURES, 'bad', file)), file, rules);
    expect(error.message).toMatch(message);
    expect(error.message.startsWith(file)).toBe(true);
    expect(error.file).toBe(file);
  });

  it('gives the line and column as fields, not only in the message', async () => {
    const error = await parseError(
      readFileSync(join(FIXTURES, 'bad', 'unknown-position-q99.csv')),
      'p.csv',
      {},
    );
    expect(error).toMatchObject({
      file: 'p.csv',
      line: 3,
      column: 'position',
      expected: expect.stringMatching(/96-well/),
    });
  });
});

describe('generated large inputs (written to a temporary folder, never committed)', () => {
  let dir: string;
  beforeAll(() => {
    dir = writeTempFiles({
      'junk-10mb.bin': junkBytes(10 * 1024 * 1024, 42),
      'junk-10mb-text.csv': junkBytes(10 * 1024 * 1024, 7, 'abcdefghij0123456789 .;-'),
      'oversize.csv': Buffer.alloc(MAX_FILE_BYTES + 1, 'a'),
    });
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('refuses 10 MB of random bytes as binary', async () => {
    const error = await parseError(readFileSync(join(dir, 'junk-10mb.bin')), 'junk-10mb.bin', {});
    expect(error.message).toMatch(/^junk-10mb\.bin line \d+: the file contains binary data/);
  });

  it('refuses 10 MB of printable junk without line breaks', async () => {
    const error = await parseError(readFileSync(join(dir, 'junk-10mb-text.csv')), 'junk.csv', {});
    expect(error.message).toMatch(/^junk\.csv line 1: a record is too long/);
  });

  it('refuses a file over the size limit before reading it', async () => {
    const error = await parseError(readFileSync(join(dir, 'oversize.csv')), 'big.csv', {});
    expect(error.message).toMatch(/^big\.csv: the file is 20\.0 MB; the limit is 20 MB$/);
  });
});

describe('file content in messages (a file may be anything, e.g. a page of credentials)', () => {
  // One long line of a secret-like value, with control characters (ESC, BEL, a bidi override) in it.
  const LONG = `k${'q'.repeat(120)}\u001b[31m\u0007\u202e${'z'.repeat(30)}`;
  /** A run of the secret longer than 40 characters, or a quoted excerpt longer than 40 (+ "…"). */
  const hasLongRun = (m: string) =>
    /q{41}/.test(m) || (m.match(/"[^"]*"/g) ?? []).some((q) => Array.from(q).length > 40 + 3);
  // eslint-disable-next-line no-control-regex
  const UNPRINTABLE = /[\u0000-\u001f\u007f-\u009f\u202a-\u202e]/;

  it.each([
    ['a header line that is not a header', `${LONG},${LONG}\n1,2\n`, {}],
    [
      'a header naming a column twice',
      `position,wavelength_nm,absorbance,${LONG},${LONG}\nA1,450,0.1,,\n`,
      {},
    ],
    ['a bad cell', `position,wavelength_nm,absorbance\nA1,450,${LONG}\n`, {}],
    ['a spectrum header', `wavelength_nm,${LONG}\n450,0.1\n`, { format: 'spectrum' as const }],
  ])('quotes at most 40 printable characters of %s', async (_what, text, rules) => {
    const error = await parseError(Buffer.from(text), 'secret.csv', rules);
    expect(error.message).toMatch(/q+…/);
    expect(hasLongRun(error.message)).toBe(false);
    expect(error.message).not.toMatch(UNPRINTABLE);
  });

  it('keeps warnings about ignored columns to a short excerpt too', async () => {
    const run = await parseInstrumentFile(
      Buffer.from(`position,wavelength_nm,absorbance,${LONG}\nA1,450,0.1,x\n`),
      'w.csv',
      {},
    );
    expect(run.warnings.join(' ')).toMatch(/^ignored column\(s\): kq+…$/);
    expect(hasLongRun(run.warnings.join(' '))).toBe(false);
  });
});
