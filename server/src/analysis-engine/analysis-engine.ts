import {
  type AnalysisSettings,
  type BatchResult,
  type Reading,
  type SampleDefinition,
  analyzeBatch,
} from '../analysis';
import { runAnalysis } from '../workers';
import { type EngineVersion, readEngineVersion } from './engine-version';

/**
 * The analysis as the server runs it, with the version of the code that runs it. The server takes one
 * at start; a test hands in another to see what a later engine would do to an approved result.
 */
export interface AnalysisEngine {
  readonly version: EngineVersion;
  /** In this thread: for the approval record, computed inside the approval's transaction. */
  analyze(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    settings: AnalysisSettings,
  ): BatchResult;
  /** Off the main thread where the engine can (requests); falls back to `analyze`. */
  analyzeAsync?(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    settings: AnalysisSettings,
  ): Promise<BatchResult>;
}

/** Run an engine's analysis off the main thread when it offers that, else in this thread. */
export async function analyzeWith(
  engine: AnalysisEngine,
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: AnalysisSettings,
): Promise<BatchResult> {
  return engine.analyzeAsync
    ? engine.analyzeAsync(readings, samples, settings)
    : engine.analyze(readings, samples, settings);
}

let current: AnalysisEngine | null = null;

/** The analysis module of this build; its version is read once per process. */
export function currentAnalysisEngine(): AnalysisEngine {
  current ??= {
    version: readEngineVersion(),
    analyze: (readings, samples, settings) => analyzeBatch(readings, samples, settings),
    analyzeAsync: (readings, samples, settings) => runAnalysis(readings, samples, settings),
  };
  return current;
}
