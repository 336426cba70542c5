import { ApplicationRef, PendingTasks, inject } from '@angular/core';
import { type MonoTypeOperatorFunction, Observable, concatMap } from 'rxjs';

/**
 * Passes each value on in a task of its own, a timer queued behind the task that received it, and brings
 * the views up to date in that same task, so that a large view update is created in one task and laid out
 * and painted in the next frame. Left to itself, Angular's change detection runs on a timer or an
 * animation frame, whichever comes first; after an answer's task (itself 10 ms or more of parsing and
 * checking) the frame is often due first, and the view's creation, style, layout and paint then make one
 * long task. The app counts as busy while a value waits (whenStable waits for it). Call in an injection
 * context.
 */
export function inOwnTask<T>(): MonoTypeOperatorFunction<T> {
  const pending = inject(PendingTasks);
  const app = inject(ApplicationRef);
  return concatMap(
    (value) =>
      new Observable<T>((subscriber) => {
        const done = pending.add();
        const timer = setTimeout(() => {
          subscriber.next(value);
          app.tick();
          subscriber.complete();
        });
        return () => {
          clearTimeout(timer);
          done();
        };
      }),
  );
}
