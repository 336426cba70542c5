import type { WorkerRequest, WorkerResponse } from './what-if-protocol';

/** The part of a Worker the what-if runner uses (a MessagePort in tests). */
export interface WhatIfWorker {
  postMessage(message: WorkerRequest): void;
  onmessage: ((event: MessageEvent<WorkerResponse>) => void) | null;
  onerror?: ((event: ErrorEvent) => void) | null;
  terminate?(): void;
}

/**
 * Starts the what-if worker (a chunk of its own that holds the analysis module); null where the platform
 * has no Worker. Kept in its own file because `import.meta` does not load under jest's CommonJS, which
 * maps this file to web/src/testing/no-web-worker.ts (jsdom has no Worker either).
 */
export function startWhatIfWorker(): WhatIfWorker | null {
  if (typeof Worker === 'undefined') return null;
  return new Worker(new URL('./what-if.worker', import.meta.url), { type: 'module' }) as WhatIfWorker;
}
