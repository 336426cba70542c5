import {
  type AnalysisSettings,
  type Reading,
  type SampleDefinition,
  analyzeBatch,
} from '@equilight/analysis';
import { type WhatIfEdits, type WhatIfOutcome, whatIfSettings } from './what-if';

/**
 * Runs the shared analysis module on the batch's own readings and manifest with the edited settings.
 * It runs in the what-if worker (what-if.worker.ts), off the page's thread; only this file and the worker
 * bring the analysis module into the browser.
 */
export function runWhatIf(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  saved: AnalysisSettings,
  e: WhatIfEdits,
): WhatIfOutcome {
  const started = performance.now();
  try {
    const result = analyzeBatch(readings, samples, whatIfSettings(saved, e));
    return { result, error: null, elapsedMs: performance.now() - started };
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    return { result: null, error: message, elapsedMs: performance.now() - started };
  }
}
