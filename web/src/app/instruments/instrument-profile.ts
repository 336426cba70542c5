export type InstrumentKind = 'plate_reader' | 'cuvette_spectrophotometer';
export type PlateFormat = '96' | '384' | 'cuvette';
export type FileFormat = 'long_table' | 'plate_grid' | 'spectrum' | 'jcamp_dx';
export type JcampPositionFrom = 'title' | 'sample_description';
export type Delimiter = 'auto' | ',' | ';' | '\t';
export type DecimalMark = '.' | ',';
export type TextEncoding = 'utf-8' | 'latin1' | 'utf-16le';

export interface ColumnNames {
  position: string;
  wavelength: string;
  absorbance: string;
  readTime: string;
  temperature: string;
  replicate: string;
}

/** How a profile's files are read. */
export interface ParsingRules {
  delimiter: Delimiter;
  decimalMark: DecimalMark;
  encoding: TextEncoding;
  skipLines: number;
  columns: ColumnNames;
  spectrumWavelengthColumn: string;
  /** JCAMP-DX: where a block's position is read. */
  jcampPositionFrom: JcampPositionFrom;
}

/** An instrument profile as the API returns it. */
export interface InstrumentProfile {
  id: number;
  name: string;
  kind: InstrumentKind;
  plateFormat: PlateFormat;
  fileFormat: FileFormat;
  rules: ParsingRules;
  pathLengthCm: number | null;
  fillVolumeUl: number | null;
  wellDiameterMm: number | null;
  defaultWavelengthNm: number | null;
  dropSubfolder: string;
  fileNamePattern: string | null;
  active: boolean;
  hasToken: boolean;
  tokenPrefix: string | null;
  tokenCreatedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

/** The fields a person edits; the server fills in missing rules and column names. */
export type ProfileFields = Omit<
  InstrumentProfile,
  'id' | 'hasToken' | 'tokenPrefix' | 'tokenCreatedAt' | 'createdAt' | 'updatedAt'
>;

/** A profile together with its plaintext token, which the server shows this once only. */
export interface ProfileWithToken {
  profile: InstrumentProfile;
  token: string;
}

/** What "try a file" sends: the parsing rules plus what the parser needs to know of the profile. */
export interface TryRules extends ParsingRules {
  format: FileFormat;
  plateFormat: PlateFormat;
  defaultWavelengthNm?: number;
}

export interface TryReading {
  position: string;
  wavelengthNm: number;
  absorbance: number | null;
  flag?: 'saturated' | 'missing';
  readTime?: string;
  temperatureC?: number;
  replicate?: number;
}

export interface TryResult {
  readingCount: number;
  readings: TryReading[];
  metadata: {
    runId?: string;
    wavelengthsNm: number[];
    temperatureC?: number;
    readTime?: string;
    extra: Record<string, string>;
  };
  warnings: string[];
}

/** Why a tried file did not parse, with where in the file when the parser knows. */
export interface TryFailure {
  message: string;
  line?: number;
  column?: string | number;
}

export const KIND_LABELS: Record<InstrumentKind, string> = {
  plate_reader: 'Plate reader',
  cuvette_spectrophotometer: 'Cuvette spectrophotometer',
};

export const PLATE_FORMAT_LABELS: Record<PlateFormat, string> = {
  '96': '96-well plate',
  '384': '384-well plate',
  cuvette: 'Cuvette sequence',
};

export const FILE_FORMAT_LABELS: Record<FileFormat, string> = {
  long_table: 'Long table',
  plate_grid: 'Plate grid',
  spectrum: 'Spectrum',
  jcamp_dx: 'JCAMP-DX (UV-Vis)',
};

export const JCAMP_POSITION_LABELS: Record<JcampPositionFrom, string> = {
  title: 'Block title (##TITLE)',
  sample_description: 'Sample description (##SAMPLE DESCRIPTION)',
};

export const DELIMITER_LABELS: Record<Delimiter, string> = {
  auto: 'Detect from the file',
  ',': 'Comma ( , )',
  ';': 'Semicolon ( ; )',
  '\t': 'Tab',
};

export const DECIMAL_MARK_LABELS: Record<DecimalMark, string> = {
  '.': 'Point ( 1.25 )',
  ',': 'Comma ( 1,25 )',
};

export const ENCODING_LABELS: Record<TextEncoding, string> = {
  'utf-8': 'UTF-8',
  latin1: 'Latin-1 (ISO 8859-1)',
  'utf-16le': 'UTF-16 LE',
};

export const DEFAULT_RULES: ParsingRules = {
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
};

function isNumberOrNull(v: unknown): boolean {
  return v === null || typeof v === 'number';
}

/** Check the shape of a profile where it arrives from the API. */
export function isInstrumentProfile(value: unknown): value is InstrumentProfile {
  const v = value as Partial<InstrumentProfile> | null;
  return (
    !!v &&
    typeof v.id === 'number' &&
    typeof v.name === 'string' &&
    typeof v.kind === 'string' &&
    v.kind in KIND_LABELS &&
    typeof v.plateFormat === 'string' &&
    v.plateFormat in PLATE_FORMAT_LABELS &&
    typeof v.fileFormat === 'string' &&
    v.fileFormat in FILE_FORMAT_LABELS &&
    !!v.rules &&
    typeof v.rules === 'object' &&
    !!v.rules.columns &&
    isNumberOrNull(v.pathLengthCm) &&
    isNumberOrNull(v.fillVolumeUl) &&
    isNumberOrNull(v.wellDiameterMm) &&
    isNumberOrNull(v.defaultWavelengthNm) &&
    typeof v.dropSubfolder === 'string' &&
    typeof v.active === 'boolean' &&
    typeof v.hasToken === 'boolean'
  );
}

export function isTryResult(value: unknown): value is TryResult {
  const v = value as Partial<TryResult> | null;
  return (
    !!v &&
    typeof v.readingCount === 'number' &&
    Array.isArray(v.readings) &&
    !!v.metadata &&
    Array.isArray(v.metadata.wavelengthsNm) &&
    Array.isArray(v.warnings)
  );
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
