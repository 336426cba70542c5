import { PendingTasks, inject } from '@angular/core';
import { type MonoTypeOperatorFunction, Observable, concatMap } from 'rxjs';

/**
 * Passes each value on in a task of its own just after the next animation frame, so that a large view update
 * is created in one task and laid out and painted in another. Angular's change detection runs on a timer or
 * an animation frame, whichever comes first: a value set straight from an answer's task (itself 10 ms or
 * more of parsing and checking) often finds the frame due first, and the view's creation, style, layout and
 * paint then make one long task. Passed on after a frame, the change detection's timer comes well before
 * the next frame, which then lays out and paints. The app counts as busy while a value waits (whenStable
 * waits for it). Call in an injection context; where there are no animation frames, a timer stands in.
 */
export function inNextFrame<T>(): MonoTypeOperatorFunction<T> {
  const pending = inject(PendingTasks);
  return concatMap(
    (value) =>
      new Observable<T>((subscriber) => {
        const done = pending.add();
        let timer: ReturnType<typeof setTimeout> | undefined;
        const pass = () => {
          timer = setTimeout(() => {
            done();
            subscriber.next(value);
            subscriber.complete();
          });
        };
        const frame = typeof requestAnimationFrame === 'function' ? requestAnimationFrame(pass) : null;
        if (frame === null) pass();
        return () => {
          if (frame !== null) cancelAnimationFrame(frame);
          clearTimeout(timer);
          done();
        };
      }),
  );
}
