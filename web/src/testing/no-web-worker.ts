import type { WhatIfWorker } from '../app/batch-detail/what-if-worker';

/** jest (jsdom) stand-in for what-if-worker.ts: jsdom has no Worker, so the answer is the same null. */
export function startWhatIfWorker(): WhatIfWorker | null {
  return null;
}
