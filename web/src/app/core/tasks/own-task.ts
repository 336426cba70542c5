import { PendingTasks, inject } from '@angular/core';
import { type MonoTypeOperatorFunction, Observable, concatMap } from 'rxjs';

/**
 * Passes each value on in a task of its own, a timer queued behind the task that received it, so that a
 * large view update is created in one task and laid out and painted in the next frame. Angular's change
 * detection runs on a timer or an animation frame, whichever comes first; set straight from an answer's
 * task (itself 10 ms or more of parsing and checking), a value often finds the frame due first, and the
 * view's creation, style, layout and paint then make one long task. Set from this timer, the value finds
 * Angular's own timer queued already (the answer's task woke it) or queues one that runs well before the
 * next frame. The app counts as busy while a value waits (whenStable waits for it). Call in an injection
 * context.
 */
export function inOwnTask<T>(): MonoTypeOperatorFunction<T> {
  const pending = inject(PendingTasks);
  return concatMap(
    (value) =>
      new Observable<T>((subscriber) => {
        const done = pending.add();
        const timer = setTimeout(() => {
          done();
          subscriber.next(value);
          subscriber.complete();
        });
        return () => {
          clearTimeout(timer);
          done();
        };
      }),
  );
}
