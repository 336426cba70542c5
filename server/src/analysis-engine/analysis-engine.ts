import {
  type AnalysisSettings,
  type BatchResult,
  type Reading,
  type SampleDefinition,
  analyzeBatch,
} from '../analysis';
import { type EngineVersion, readEngineVersion } from './engine-version';

/**
 * The analysis as the server runs it, with the version of the code that runs it. The server takes one
 * at start; a test hands in another to see what a later engine would do to an approved result.
 */
export interface AnalysisEngine {
  readonly version: EngineVersion;
  analyze(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    settings: AnalysisSettings,
  ): BatchResult;
}

let current: AnalysisEngine | null = null;

/** The analysis module of this build; its version is read once per process. */
export function currentAnalysisEngine(): AnalysisEngine {
  current ??= {
    version: readEngineVersion(),
    analyze: (readings, samples, settings) => analyzeBatch(readings, samples, settings),
  };
  return current;
}
