/** Instrument-file and manifest parsers: raw export bytes in, readings or sample definitions out. */
export type { Reading, SampleDefinition } from '../analysis/types';
export { ParseError } from './parse-error';
export {
  DEFAULT_PARSE_RULES,
  resolveParseRules,
  type FileFormat,
  type ParseRules,
  type ParseRulesInput,
  type PlateFormat,
} from './parse-rules';
export type { ParsedRun, RunMetadata } from './reading-set';
export { parseInstrumentFile } from './parse-instrument-file';
export { parseManifestCsv, type ManifestParseResult, type ManifestProblem } from './manifest';
export { isValidPosition } from './position';
export { MAX_FILE_BYTES } from './decode-text';
