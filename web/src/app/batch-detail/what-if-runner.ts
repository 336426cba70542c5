import { DestroyRef, Injectable, InjectionToken, inject } from '@angular/core';
import type { AnalysisSettings, Reading, SampleDefinition, SpectralSettings } from '@equilight/analysis';
import { Observable } from 'rxjs';
import type { SpectraOutcome } from './spectra-compute';
import type { WhatIfEdits, WhatIfOutcome } from './what-if';
import type { WorkerRequest, WorkerResponse } from './what-if-protocol';
import { type WhatIfWorker, startWhatIfWorker } from './what-if-worker';
import { APP_UPDATED_TEXT, loadOrOfferReload } from '../core/routing/app-updated';

/** Starts the what-if worker; null where the platform has none, and the analysis runs in-thread. */
export const WHAT_IF_WORKER = new InjectionToken<() => WhatIfWorker | null>('what-if worker', {
  providedIn: 'root',
  factory: () => startWhatIfWorker,
});

/** A request waiting for the worker: what to do with its answer, or with the worker's failure. */
interface Waiting {
  answer(response: WorkerResponse): void;
  fail(error: string): void;
  /** The same analysis in this thread, for when the worker's own script could not be loaded. */
  runInThread(): void;
}

/**
 * Runs what-if and whole-spectrum analyses in a Web Worker, one worker per page, started on the first
 * request. An answer that arrives after its caller unsubscribed (a newer edit) is dropped. Where the
 * worker's script cannot be loaded (a tab opened before a new build), the analyses run in this thread,
 * as where there is no Worker at all.
 */
@Injectable()
export class WhatIfRunner {
  private readonly startWorker = inject(WHAT_IF_WORKER);
  private worker: WhatIfWorker | null | undefined;
  private nextId = 1;
  private readonly waiting = new Map<number, Waiting>();

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
    return this.ask<WhatIfOutcome>(
      (id) => ({ id, readings, samples, saved, edits }),
      (r) => ('outcome' in r ? r.outcome : null),
      (error) => ({ result: null, error, elapsedMs: 0 }),
      () => import('./what-if-compute').then(({ runWhatIf }) => runWhatIf(readings, samples, saved, edits)),
    );
  }

  /** The whole-spectrum analysis of the batch's readings with these settings, off the page's thread. */
  runSpectra(
    readings: readonly Reading[],
    samples: readonly SampleDefinition[],
    settings: SpectralSettings,
  ): Observable<SpectraOutcome> {
    return this.ask<SpectraOutcome>(
      (id) => ({ kind: 'spectra', id, readings, samples, settings }),
      (r) => ('spectra' in r ? r.spectra : null),
      (error) => ({ result: null, error, elapsedMs: 0 }),
      () => import('./spectra-compute').then(({ runSpectra }) => runSpectra(readings, samples, settings)),
    );
  }

  private ask<T>(
    request: (id: number) => WorkerRequest,
    read: (response: WorkerResponse) => T | null,
    failed: (error: string) => T,
    inThread: () => Promise<T>,
  ): Observable<T> {
    return new Observable<T>((subscriber) => {
      const id = this.nextId++;
      const done = (value: T) => {
        subscriber.next(value);
        subscriber.complete();
      };
      // The same analysis in this thread, its code loaded only when needed; when that script is gone too
      // (a new build), the offer to reload, and the reason as the answer.
      const runInThread = () =>
        void loadOrOfferReload(inThread).then(
          (value) => {
            if (!subscriber.closed) done(value ?? failed(APP_UPDATED_TEXT));
          },
          (err: unknown) => {
            if (!subscriber.closed) done(failed(err instanceof Error ? err.message : String(err)));
          },
        );
      const worker = this.ensureWorker();
      if (worker) {
        this.waiting.set(id, {
          answer: (response) => done(read(response) ?? failed('The worker answered another question.')),
          fail: (error) => done(failed(error)),
          runInThread,
        });
        worker.postMessage(request(id));
      } else {
        runInThread();
      }
      return () => this.waiting.delete(id);
    });
  }

  private ensureWorker(): WhatIfWorker | null {
    if (this.worker !== undefined) return this.worker;
    const worker = this.startWorker();
    if (worker) {
      worker.onmessage = ({ data }) => {
        const waiting = this.waiting.get(data.id);
        this.waiting.delete(data.id);
        waiting?.answer(data);
      };
      worker.onerror = (event) => {
        const waiting = [...this.waiting.values()];
        this.waiting.clear();
        worker.terminate?.();
        if (!event.message) {
          // An error with no message: the worker's script itself could not be loaded (an error thrown by
          // the analysis always carries one). No worker for this page: its analyses run in this thread.
          this.worker = null;
          for (const w of waiting) w.runInThread();
          return;
        }
        // A broken worker is replaced on the next request rather than left to swallow requests.
        this.worker = undefined;
        const error = `The what-if analysis stopped: ${event.message}`;
        for (const w of waiting) w.fail(error);
      };
    }
    this.worker = worker;
    return worker;
  }
}
