import { TestBed } from '@angular/core/testing';
import { TableScroll } from './table-scroll';

/** jsdom lays nothing out: give the frame the widths a browser would measure. */
function setWidths(el: HTMLElement, scrollWidth: number, clientWidth: number, scrollLeft = 0): void {
  Object.defineProperty(el, 'scrollWidth', { configurable: true, value: scrollWidth });
  Object.defineProperty(el, 'clientWidth', { configurable: true, value: clientWidth });
  Object.defineProperty(el, 'scrollLeft', { configurable: true, value: scrollLeft, writable: true });
}

async function frame() {
  TestBed.configureTestingModule({ imports: [TableScroll] });
  const fixture = TestBed.createComponent(TableScroll);
  fixture.componentRef.setInput('label', 'Received files');
  await fixture.whenStable();
  await nextFrame(); // the observers start after the first render
  const host = fixture.nativeElement as HTMLElement;
  const scroller = host.querySelector<HTMLElement>('[data-testid="table-scroll"]')!;
  const shade = (edge: 'start' | 'end') => host.querySelector(`.eq-ts__shade--${edge}`)!;
  const scrollTo = async (scrollWidth: number, clientWidth: number, scrollLeft: number) => {
    setWidths(scroller, scrollWidth, clientWidth, scrollLeft);
    scroller.dispatchEvent(new Event('scroll'));
    await fixture.whenStable();
  };
  return { scroller, shade, scrollTo, fixture };
}

const nextFrame = () => new Promise<void>((resolve) => requestAnimationFrame(() => resolve()));

describe('TableScroll', () => {
  it('is a plain frame while the table fits: no region, no tab stop, no shade', async () => {
    const { scroller, shade, scrollTo } = await frame();
    await scrollTo(800, 800, 0);
    expect(scroller.getAttribute('role')).toBeNull();
    expect(scroller.getAttribute('tabindex')).toBeNull();
    expect(scroller.getAttribute('aria-label')).toBeNull();
    expect(shade('start').classList).not.toContain('eq-ts__shade--on');
    expect(shade('end').classList).not.toContain('eq-ts__shade--on');
  });

  it('while the table is wider: a named region in the tab order, with a shade on each edge that hides columns', async () => {
    const { scroller, shade, scrollTo } = await frame();
    await scrollTo(1400, 1000, 0);
    expect(scroller.getAttribute('role')).toBe('region');
    expect(scroller.getAttribute('tabindex')).toBe('0');
    expect(scroller.getAttribute('aria-label')).toBe('Received files (scrolls sideways)');
    expect(scroller.dataset['cut']).toBe('end');
    expect(shade('end').classList).toContain('eq-ts__shade--on');
    expect(shade('start').classList).not.toContain('eq-ts__shade--on');

    await scrollTo(1400, 1000, 200);
    expect(scroller.dataset['cut']).toBe('both');

    await scrollTo(1400, 1000, 400);
    expect(scroller.dataset['cut']).toBe('start');
    expect(shade('end').classList).not.toContain('eq-ts__shade--on');
    expect(shade('start').classList).toContain('eq-ts__shade--on');
  });

  it('measures again when the content changes inside without resizing (a mark that sticks out goes)', async () => {
    // jsdom has no ResizeObserver; a browser's would not call back here, as no box changes size.
    const globals = globalThis as { ResizeObserver?: unknown };
    const original = globals.ResizeObserver;
    globals.ResizeObserver = class {
      observe(): void {}
      disconnect(): void {}
    };
    const { scroller, scrollTo, fixture } = await frame().finally(() => (globals.ResizeObserver = original));
    await scrollTo(626, 622, 0);
    expect(scroller.dataset['cut']).toBe('end');
    // The mark is removed: no box changes size, only the width to scroll.
    const mark = document.createElement('span');
    scroller.appendChild(mark);
    await new Promise((r) => setTimeout(r));
    setWidths(scroller, 622, 622, 0);
    mark.remove();
    await new Promise((r) => setTimeout(r)); // mutation records are delivered
    await nextFrame();
    await fixture.whenStable();
    expect(scroller.dataset['cut']).toBeUndefined();
    expect(scroller.getAttribute('role')).toBeNull();
  });
});
