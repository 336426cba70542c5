import { HttpErrorResponse } from '@angular/common/http';
import { EnvironmentInjector, createEnvironmentInjector, runInInjectionContext } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Subject } from 'rxjs';
import { LoadState } from './load-state';

describe('LoadState', () => {
  function create() {
    const injector = createEnvironmentInjector([], TestBed.inject(EnvironmentInjector));
    const state = runInInjectionContext(injector, () => new LoadState());
    return { state, destroy: () => injector.destroy() };
  }

  it('keeps the answer to the last request when an earlier one answers later', () => {
    const { state } = create();
    const first = new Subject<string>();
    const second = new Subject<string>();
    const shown: string[] = [];
    state.load(first, (v) => shown.push(v));
    state.load(second, (v) => shown.push(v));
    expect(first.observed).toBe(false);
    second.next('second');
    first.next('first');
    expect(shown).toEqual(['second']);
    expect(state.loading()).toBe(false);
  });

  it('shows the server message of a failure, clears it on the next answer, and lets a page handle one itself', () => {
    const { state } = create();
    const failing = new Subject<string>();
    state.load(failing, () => undefined);
    expect(state.loading()).toBe(true);
    failing.error(
      new HttpErrorResponse({ status: 500, error: { error: { code: 'internal', message: 'Disk full.' } } }),
    );
    expect(state.error()).toBe('Disk full.');
    expect(state.loading()).toBe(false);

    const ok = new Subject<number>();
    state.load(ok, () => undefined);
    ok.next(1);
    expect(state.error()).toBeNull();

    const handled = new Subject<number>();
    const seen: unknown[] = [];
    state.load(
      handled,
      () => undefined,
      (err) => seen.push(err) > 0,
    );
    handled.error(new HttpErrorResponse({ status: 404 }));
    expect(seen).toHaveLength(1);
    expect(state.error()).toBeNull();
  });

  it('stops listening when its page is destroyed', () => {
    const { state, destroy } = create();
    const request = new Subject<number>();
    const shown: number[] = [];
    state.load(request, (v) => shown.push(v));
    destroy();
    request.next(1);
    expect(shown).toEqual([]);
    expect(request.observed).toBe(false);
  });
});
