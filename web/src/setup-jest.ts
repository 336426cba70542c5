import { setupZonelessTestEnv } from 'jest-preset-angular/setup-env/zoneless';

setupZonelessTestEnv();

// jsdom lays nothing out, so nothing is ever in view: an observer that watches and never reports is its
// honest answer. `@defer (on viewport)` blocks stay on their placeholder in component tests.
if (typeof globalThis.IntersectionObserver === 'undefined') {
  class NothingInView {
    readonly root = null;
    readonly rootMargin = '0px';
    readonly thresholds = [0];
    observe(): void {}
    unobserve(): void {}
    disconnect(): void {}
    takeRecords(): IntersectionObserverEntry[] {
      return [];
    }
  }
  globalThis.IntersectionObserver = NothingInView as unknown as typeof IntersectionObserver;
}
