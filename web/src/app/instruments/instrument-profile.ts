import type { FileFormat, ParsingRules, PlateFormat, ProfileDto } from '@equilight/contracts';

export type {
  ColumnNames,
  DecimalMark,
  Delimiter,
  FileFormat,
  InstrumentKind,
  JcampPositionFrom,
  ParsingRules,
  PlateFormat,
  ProfileWithToken,
  TextEncoding,
  TryResult,
} from '@equilight/contracts';
export {
  DECIMAL_MARK_LABELS,
  DEFAULT_PARSING_RULES as DEFAULT_RULES,
  DELIMITER_LABELS,
  ENCODING_LABELS,
  FILE_FORMAT_LABELS,
  JCAMP_POSITION_LABELS,
  KIND_LABELS,
  PLATE_FORMAT_LABELS,
} from '@equilight/contracts';

/** An instrument profile as the API returns it. */
export type InstrumentProfile = ProfileDto;

/** The fields a person edits; the server fills in missing rules and column names. */
export type ProfileFields = Omit<
  InstrumentProfile,
  'id' | 'hasToken' | 'tokenPrefix' | 'tokenCreatedAt' | 'createdAt' | 'updatedAt'
>;

/** What "try a file" sends: the parsing rules plus what the parser needs to know of the profile. */
export interface TryRules extends ParsingRules {
  format: FileFormat;
  plateFormat: PlateFormat;
  defaultWavelengthNm?: number;
}

/** Why a tried file did not parse, with where in the file when the parser knows. */
export interface TryFailure {
  message: string;
  line?: number;
  column?: string | number;
}

/**
 * Checks a file-name pattern: it must compile as a regular expression and have a capture group
 * (the first group, or the group named `run`, gives the run id). Returns the problem, or null.
 */
export function fileNamePatternProblem(pattern: string): string | null {
  let re: RegExp;
  try {
    re = new RegExp(pattern);
  } catch (err) {
    return `Not a valid regular expression: ${(err as Error).message}`;
  }
  // An alternative that always matches reveals how many groups the pattern has.
  const groups = new RegExp(`${re.source}|`).exec('')!.length - 1;
  return groups > 0 ? null : 'Add a capture group, e.g. (\\w+), or a group named run: (?<run>…)';
}

/** The run id a file-name pattern gives for a file name, or null when it does not match. */
export function runIdFromFileName(pattern: string, fileName: string): string | null {
  if (fileNamePatternProblem(pattern)) return null;
  const match = new RegExp(pattern).exec(fileName);
  if (!match) return null;
  return match.groups?.['run'] ?? match[1] ?? null;
}
