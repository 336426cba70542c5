import { ApplicationRef, Injector, runInInjectionContext } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Subject } from 'rxjs';
import { inOwnTask } from './own-task';

describe('inOwnTask', () => {
  afterEach(() => jest.useRealTimers());

  const operator = <T>() => runInInjectionContext(TestBed.inject(Injector), () => inOwnTask<T>());

  it('passes each value on in a task of its own, after the task that received it, one per task in order', () => {
    jest.useFakeTimers();
    const source = new Subject<string>();
    const seen: string[] = [];
    source.pipe(operator<string>()).subscribe((v) => seen.push(v));
    const earlier: string[] = [];
    setTimeout(() => earlier.push(`timer queued before: saw ${seen.length}`));
    source.next('a');
    source.next('b');
    expect(seen).toEqual([]);
    jest.runOnlyPendingTimers();
    expect(earlier).toEqual(['timer queued before: saw 0']);
    expect(seen).toEqual(['a']);
    jest.runOnlyPendingTimers();
    expect(seen).toEqual(['a', 'b']);
  });

  it('brings the views up to date in the same task, right after passing the value on', () => {
    jest.useFakeTimers();
    const tick = jest.spyOn(TestBed.inject(ApplicationRef), 'tick');
    const source = new Subject<number>();
    const received = jest.fn();
    source.pipe(operator<number>()).subscribe(received);
    source.next(1);
    expect(tick).not.toHaveBeenCalled();
    jest.runOnlyPendingTimers();
    expect(received).toHaveBeenCalledWith(1);
    expect(tick).toHaveBeenCalled();
    expect(tick.mock.invocationCallOrder[0]).toBeGreaterThan(received.mock.invocationCallOrder[0]);
  });

  it('keeps the app busy while a value waits, and unsubscribing cancels it', () => {
    jest.useFakeTimers();
    const states: boolean[] = [];
    const watching = TestBed.inject(ApplicationRef).isStable.subscribe((stable) => states.push(stable));
    const source = new Subject<number>();
    const seen: number[] = [];
    const subscription = source.pipe(operator<number>()).subscribe((v) => seen.push(v));
    source.next(1);
    expect(states.at(-1)).toBe(false);
    subscription.unsubscribe();
    jest.runAllTimers();
    expect(seen).toEqual([]);
    expect(states.at(-1)).toBe(true);
    watching.unsubscribe();
  });
});
