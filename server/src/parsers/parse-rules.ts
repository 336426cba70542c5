import { ParseError } from './parse-error';

import type { FileFormat, PlateFormat } from '../contracts/enums';
import { DEFAULT_PARSING_RULES, type ParsingRules } from '../contracts/settings';

export type { FileFormat, PlateFormat } from '../contracts/enums';
export type Delimiter = ',' | ';' | '\t';

/** How one instrument profile's files are read: the profile's parsing rules plus what the parser needs of the profile. */
export interface ParseRules extends ParsingRules {
  format: FileFormat;
  plateFormat: PlateFormat;
  /** Used by plate grids that have no `wavelength_nm` key line. */
  defaultWavelengthNm?: number;
}

export type ParseRulesInput = Partial<Omit<ParseRules, 'columns'>> & {
  columns?: Partial<ParseRules['columns']>;
};

export const DEFAULT_PARSE_RULES: ParseRules = Object.freeze({
  ...DEFAULT_PARSING_RULES,
  format: 'long_table',
  plateFormat: '96',
}) as ParseRules;

const FORMATS: readonly FileFormat[] = ['long_table', 'plate_grid', 'spectrum', 'jcamp_dx'];
const DELIMITERS: readonly string[] = ['auto', ',', ';', '\t'];
const ENCODINGS: readonly string[] = ['utf-8', 'latin1', 'utf-16le'];
const MAX_SKIP_LINES = 1000;

function rulesError(detail: string): ParseError {
  return new ParseError({ file: 'parsing rules', detail });
}

/**
 * Fills in defaults and checks the rules once, so that the parsers can trust them.
 * Throws a ParseError (file "parsing rules") for a rule set that cannot work,
 * e.g. a decimal comma with a comma delimiter.
 */
export function resolveParseRules(partial: ParseRulesInput = {}): ParseRules {
  const defined = Object.fromEntries(Object.entries(partial).filter(([, v]) => v !== undefined));
  const columnsIn = Object.fromEntries(
    Object.entries(partial.columns ?? {}).filter(([, v]) => v !== undefined && String(v).trim() !== ''),
  );
  const rules: ParseRules = {
    ...DEFAULT_PARSE_RULES,
    ...defined,
    columns: { ...DEFAULT_PARSE_RULES.columns, ...columnsIn },
  };
  if (!FORMATS.includes(rules.format)) {
    throw rulesError(`unknown file format "${String(rules.format)}": expected one of ${FORMATS.join(', ')}`);
  }
  if (!DELIMITERS.includes(rules.delimiter)) {
    throw rulesError(`unknown delimiter ${JSON.stringify(rules.delimiter)}: expected auto, ",", ";" or tab`);
  }
  if (rules.decimalMark !== '.' && rules.decimalMark !== ',') {
    throw rulesError(`unknown decimal mark ${JSON.stringify(rules.decimalMark)}: expected "." or ","`);
  }
  if (rules.decimalMark === ',' && rules.delimiter === ',') {
    throw rulesError('a decimal comma needs a ";" or tab delimiter, not ","');
  }
  if (rules.jcampPositionFrom !== 'title' && rules.jcampPositionFrom !== 'sample_description') {
    throw rulesError(
      `unknown JCAMP-DX position source "${String(rules.jcampPositionFrom)}": expected title or sample_description`,
    );
  }
  if (!ENCODINGS.includes(rules.encoding)) {
    throw rulesError(`unknown encoding "${String(rules.encoding)}": expected ${ENCODINGS.join(', ')}`);
  }
  if (!Number.isInteger(rules.skipLines) || rules.skipLines < 0 || rules.skipLines > MAX_SKIP_LINES) {
    throw rulesError(`lines to skip must be a whole number from 0 to ${MAX_SKIP_LINES}`);
  }
  if (rules.plateFormat !== '96' && rules.plateFormat !== '384' && rules.plateFormat !== 'cuvette') {
    throw rulesError(`unknown plate format "${String(rules.plateFormat)}": expected 96, 384 or cuvette`);
  }
  if (
    rules.defaultWavelengthNm !== undefined &&
    !(Number.isFinite(rules.defaultWavelengthNm) && rules.defaultWavelengthNm > 0)
  ) {
    throw rulesError('the default wavelength must be a positive number of nanometres');
  }
  const names = Object.values(rules.columns).map((n) => n.trim().toLowerCase());
  if (new Set(names).size !== names.length) {
    throw rulesError('two long-table columns have the same name');
  }
  return rules;
}
