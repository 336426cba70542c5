import { DestroyRef, Injectable, InjectionToken, inject } from '@angular/core';
import type { AnalysisSettings, Reading, SampleDefinition } from '@equilight/analysis';
import { Observable } from 'rxjs';
import type { WhatIfEdits, WhatIfOutcome } from './what-if';
import { type WhatIfWorker, startWhatIfWorker } from './what-if-worker';

/** Starts the what-if worker; null where the platform has none, and the analysis runs in-thread. */
export const WHAT_IF_WORKER = new InjectionToken<() => WhatIfWorker | null>('what-if worker', {
  providedIn: 'root',
  factory: () => startWhatIfWorker,
});

/**
 * Runs what-if analyses in a Web Worker, one worker per page, started on the first edit. An answer that
 * arrives after its caller unsubscribed (a newer edit) is dropped.
 */
@Injectable()
export class WhatIfRunner {
  private readonly startWorker = inject(WHAT_IF_WORKER);
  private worker: WhatIfWorker | null | undefined;
  private nextId = 1;
  private readonly waiting = new Map<number, (outcome: WhatIfOutcome) => void>();

  constructor() {
    inject(DestroyRef).onDestroy(() => {
      this.worker?.terminate?.();
      this.waiting.clear();
    });
  }

  run(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    saved: AnalysisSettings,
    edits: WhatIfEdits,
  ): Observable<WhatIfOutcome> {
    return new Observable<WhatIfOutcome>((subscriber) => {
      const id = this.nextId++;
      const done = (outcome: WhatIfOutcome) => {
        subscriber.next(outcome);
        subscriber.complete();
      };
      const worker = this.ensureWorker();
      if (worker) {
        this.waiting.set(id, done);
        worker.postMessage({ id, readings, samples, saved, edits });
      } else {
        // No Worker here: the same analysis in this thread, loaded only when needed.
        void import('./what-if-compute').then(({ runWhatIf }) => {
          if (!subscriber.closed) done(runWhatIf(readings, samples, saved, edits));
        });
      }
      return () => this.waiting.delete(id);
    });
  }

  private ensureWorker(): WhatIfWorker | null {
    if (this.worker !== undefined) return this.worker;
    const worker = this.startWorker();
    if (worker) {
      worker.onmessage = ({ data }) => {
        const done = this.waiting.get(data.id);
        this.waiting.delete(data.id);
        done?.(data.outcome);
      };
      worker.onerror = (event) => {
        const error = `The what-if analysis stopped: ${event.message || 'worker error'}`;
        const waiting = [...this.waiting.values()];
        this.waiting.clear();
        // A broken worker is replaced on the next edit rather than left to swallow requests.
        worker.terminate?.();
        this.worker = undefined;
        for (const done of waiting) done({ result: null, error, elapsedMs: 0 });
      };
    }
    this.worker = worker;
    return worker;
  }
}
