import { readCsvRows, detectDelimiter, type CsvRow } from './csv-rows';
import { decodeText } from './decode-text';
import { parseJcamp } from './jcamp';
import { parseLongTable } from './long-table';
import { ParseError } from './parse-error';
import { resolveParseRules, type Delimiter, type ParseRules, type ParseRulesInput } from './parse-rules';
import { parsePlateGrid } from './plate-grid';
import type { ParsedRun } from './reading-set';
import { parseSpectrum } from './spectrum';

/**
 * Reads one instrument export into readings with the rules of its profile.
 * `fileName` only labels messages; it is never opened or joined to a path.
 * Any problem throws a ParseError that names the file, line and column: a file
 * either parses completely or yields nothing.
 */
export async function parseInstrumentFile(
  content: Buffer,
  fileName: string,
  rules?: ParseRulesInput,
): Promise<ParsedRun> {
  const resolved = resolveParseRules(rules);
  const { text, warnings } = decodeText(content, fileName, resolved.encoding);
  if (resolved.format === 'jcamp_dx') {
    const run = parseJcamp(text, fileName, resolved);
    return warnings.length > 0 ? { ...run, warnings: [...warnings, ...run.warnings] } : run;
  }
  const candidates: Delimiter[] = resolved.decimalMark === ',' ? [';', '\t'] : [',', ';', '\t'];
  const delimiter =
    resolved.delimiter === 'auto'
      ? detectDelimiter(text, resolved.skipLines, candidates)
      : resolved.delimiter;
  const rows = await readCsvRows(text, { file: fileName, delimiter, skipLines: resolved.skipLines });
  if (rows.length === 0) {
    const skipped = resolved.skipLines > 0 ? ` after skipping ${resolved.skipLines} line(s)` : '';
    throw new ParseError({ file: fileName, detail: `no readings: the file has no data${skipped}` });
  }
  const run = parseRows(rows, fileName, resolved, delimiter);
  return warnings.length > 0 ? { ...run, warnings: [...warnings, ...run.warnings] } : run;
}

function parseRows(rows: CsvRow[], fileName: string, rules: ParseRules, delimiter: Delimiter): ParsedRun {
  switch (rules.format) {
    case 'long_table':
      return parseLongTable(rows, fileName, rules, delimiter);
    case 'plate_grid':
      return parsePlateGrid(rows, fileName, rules);
    case 'spectrum':
      return parseSpectrum(rows, fileName, rules, delimiter);
    case 'jcamp_dx':
      throw new Error('JCAMP-DX files are read before any CSV parsing');
  }
}
