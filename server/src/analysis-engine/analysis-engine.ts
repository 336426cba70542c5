import {
  type AnalysisSettings,
  type BatchResult,
  type Reading,
  type SampleDefinition,
  type SpectralAnalysisResult,
  type SpectralSettings,
  analyzeBatch,
  analyzeSpectra,
} from '../analysis';
import { runAnalysis, runSpectra } from '../workers';
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
  /** The whole-spectrum analysis off the main thread where the engine can; else in this thread. */
  spectraAsync?(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    settings: SpectralSettings,
  ): Promise<SpectralAnalysisResult>;
}

/** Run an engine's whole-spectrum analysis off the main thread when it offers that, else in this thread. */
export async function analyzeSpectraWith(
  engine: AnalysisEngine,
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: SpectralSettings,
): Promise<SpectralAnalysisResult> {
  return engine.spectraAsync
    ? engine.spectraAsync(readings, samples, settings)
    : analyzeSpectra(readings, samples, settings);
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
    spectraAsync: (readings, samples, settings) => runSpectra(readings, samples, settings),
  };
  return current;
}
