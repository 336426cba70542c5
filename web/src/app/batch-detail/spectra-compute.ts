import {
  type Reading,
  type SampleDefinition,
  type SpectralAnalysisResult,
  type SpectralSettings,
  analyzeSpectra,
} from '@equilight/analysis';

/** The whole-spectrum analysis of a batch as the browser ran it, or why it could not run. */
export interface SpectraOutcome {
  result: SpectralAnalysisResult | null;
  error: string | null;
  /** Time the analysis took in the browser, ms. */
  elapsedMs: number;
}

/**
 * Runs the shared whole-spectrum analysis on the batch's own readings and manifest. It runs in the
 * what-if worker (what-if.worker.ts), off the page's thread; never throws.
 */
export function runSpectra(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: SpectralSettings,
): SpectraOutcome {
  const started = performance.now();
  try {
    const result = analyzeSpectra(readings, samples, settings);
    return { result, error: null, elapsedMs: performance.now() - started };
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    return { result: null, error: message, elapsedMs: performance.now() - started };
  }
}
