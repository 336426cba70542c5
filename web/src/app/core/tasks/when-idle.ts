import { Observable } from 'rxjs';

/**
 * Runs `run` in the browser's next idle moment; where there are no idle callbacks (jsdom, older engines) in
 * a task of its own. No deadline: one would force the work into a busy moment, which is what waiting for
 * idle avoids (a page streaming live events still has idle moments between them). Returns a function that
 * cancels it.
 */
export function runWhenIdle(run: () => void): () => void {
  if (typeof globalThis.requestIdleCallback === 'function') {
    const handle = globalThis.requestIdleCallback(() => run());
    return () => globalThis.cancelIdleCallback(handle);
  }
  const handle = setTimeout(run, 1);
  return () => clearTimeout(handle);
}

/** Emits once, in the browser's next idle moment (see `runWhenIdle`), then completes; unsubscribing cancels. */
export function whenIdle(): Observable<void> {
  return new Observable<void>((subscriber) =>
    runWhenIdle(() => {
      subscriber.next();
      subscriber.complete();
    }),
  );
}
