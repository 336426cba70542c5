import { runWhenIdle, whenIdle } from './when-idle';

describe('runWhenIdle / whenIdle', () => {
  const original = { request: globalThis.requestIdleCallback, cancel: globalThis.cancelIdleCallback };
  afterEach(() => {
    globalThis.requestIdleCallback = original.request;
    globalThis.cancelIdleCallback = original.cancel;
    jest.useRealTimers();
  });

  /** A browser's idle callbacks, run when the test says the browser is idle. */
  function fakeIdleCallbacks() {
    const waiting = new Map<number, { run: IdleRequestCallback; options?: IdleRequestOptions }>();
    let next = 1;
    globalThis.requestIdleCallback = (run, options) => {
      waiting.set(next, { run, options });
      return next++;
    };
    globalThis.cancelIdleCallback = (handle) => waiting.delete(handle);
    return {
      waiting,
      idle() {
        for (const [handle, { run }] of [...waiting]) {
          waiting.delete(handle);
          run({ didTimeout: false, timeRemaining: () => 10 });
        }
      },
    };
  }

  it('waits for the browser to be idle, with no deadline, and can be cancelled', () => {
    const browser = fakeIdleCallbacks();
    const ran: string[] = [];
    runWhenIdle(() => ran.push('first'));
    const cancel = runWhenIdle(() => ran.push('cancelled'));
    expect([...browser.waiting.values()].map((w) => w.options?.timeout)).toEqual([undefined, undefined]);
    cancel();
    expect(ran).toEqual([]);
    browser.idle();
    expect(ran).toEqual(['first']);
  });

  it('runs in a task of its own where the browser has no idle callbacks', () => {
    jest.useFakeTimers();
    (globalThis as { requestIdleCallback?: unknown }).requestIdleCallback = undefined;
    const ran: string[] = [];
    runWhenIdle(() => ran.push('ran'));
    expect(ran).toEqual([]);
    jest.advanceTimersByTime(1);
    expect(ran).toEqual(['ran']);
  });

  it('as an observable: emits once in the idle moment and completes; unsubscribing cancels', () => {
    const browser = fakeIdleCallbacks();
    const seen: string[] = [];
    whenIdle().subscribe({ next: () => seen.push('next'), complete: () => seen.push('complete') });
    whenIdle()
      .subscribe(() => seen.push('unwanted'))
      .unsubscribe();
    expect(browser.waiting.size).toBe(1);
    browser.idle();
    expect(seen).toEqual(['next', 'complete']);
  });
});
