import { ApplicationRef, Injector, runInInjectionContext } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Subject } from 'rxjs';
import { inNextFrame } from './next-frame';

describe('inNextFrame', () => {
  const original = { request: globalThis.requestAnimationFrame, cancel: globalThis.cancelAnimationFrame };
  afterEach(() => {
    globalThis.requestAnimationFrame = original.request;
    globalThis.cancelAnimationFrame = original.cancel;
    jest.useRealTimers();
  });

  /** A browser's animation frames, run when the test says a frame comes; timers are jest's fake ones. */
  function fakeFrames() {
    jest.useFakeTimers();
    const waiting = new Map<number, FrameRequestCallback>();
    let next = 1;
    globalThis.requestAnimationFrame = (run) => {
      waiting.set(next, run);
      return next++;
    };
    globalThis.cancelAnimationFrame = (handle) => waiting.delete(handle);
    return {
      waiting,
      frame() {
        for (const [handle, run] of [...waiting]) {
          waiting.delete(handle);
          run(performance.now());
        }
      },
    };
  }

  const operator = <T>() => runInInjectionContext(TestBed.inject(Injector), () => inNextFrame<T>());

  it('passes each value on in a task of its own after the next frame, in order', () => {
    const browser = fakeFrames();
    const source = new Subject<string>();
    const seen: string[] = [];
    source.pipe(operator<string>()).subscribe((v) => seen.push(v));
    source.next('a');
    source.next('b');
    expect(seen).toEqual([]);
    jest.advanceTimersByTime(5); // timers alone do not pass it: it waits for a frame
    expect(seen).toEqual([]);
    browser.frame();
    expect(seen).toEqual([]); // not inside the frame's callbacks
    jest.advanceTimersByTime(0);
    expect(seen).toEqual(['a']);
    browser.frame();
    jest.advanceTimersByTime(0);
    expect(seen).toEqual(['a', 'b']);
  });

  it('keeps the app busy while a value waits, and unsubscribing cancels it', () => {
    const browser = fakeFrames();
    const states: boolean[] = [];
    const watching = TestBed.inject(ApplicationRef).isStable.subscribe((stable) => states.push(stable));
    const source = new Subject<number>();
    const seen: number[] = [];
    const subscription = source.pipe(operator<number>()).subscribe((v) => seen.push(v));
    source.next(1);
    expect(states.at(-1)).toBe(false);
    subscription.unsubscribe();
    browser.frame();
    jest.runAllTimers();
    expect(seen).toEqual([]);
    expect(states.at(-1)).toBe(true);
    watching.unsubscribe();
  });

  it('uses a timer where there are no animation frames', () => {
    jest.useFakeTimers();
    (globalThis as { requestAnimationFrame?: unknown }).requestAnimationFrame = undefined;
    const seen: number[] = [];
    const source = new Subject<number>();
    source.pipe(operator<number>()).subscribe((v) => seen.push(v));
    source.next(7);
    expect(seen).toEqual([]);
    jest.advanceTimersByTime(0);
    expect(seen).toEqual([7]);
  });
});
