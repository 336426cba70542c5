import { Observable } from 'rxjs';

/** How long work asked for in an idle moment may wait when the page is never idle (live events streaming). */
export const IDLE_TIMEOUT_MS = 1000;

/**
 * Runs `run` in the browser's next idle moment, or after `IDLE_TIMEOUT_MS` at the latest; where there are
 * no idle callbacks (jsdom, older engines) in a task of its own. Returns a function that cancels it.
 */
export function runWhenIdle(run: () => void): () => void {
  if (typeof globalThis.requestIdleCallback === 'function') {
    const handle = globalThis.requestIdleCallback(() => run(), { timeout: IDLE_TIMEOUT_MS });
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
