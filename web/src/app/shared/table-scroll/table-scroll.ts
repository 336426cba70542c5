import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterNextRender,
  inject,
  input,
  signal,
  viewChild,
} from '@angular/core';

/** Pixels of slack before an edge counts as cut (sub-pixel widths at odd zoom levels). */
const SLACK_PX = 2;

/**
 * A wide table's frame: the table scrolls sideways inside it, a shadow and an arrow show the edge that is
 * cut, and while it scrolls the frame is a named region in the tab order (arrow keys scroll it).
 * It is also the size container `eq-table`, so a page can drop columns by width with
 * `@container eq-table (max-width: …) { .mat-column-x { display: none } }`.
 *
 * `<eq-table-scroll label="Received files"><table mat-table …></table></eq-table-scroll>`
 */
@Component({
  selector: 'eq-table-scroll',
  template: `
    <div
      #scroller
      class="eq-ts__scroller"
      [attr.role]="overflowing() ? 'region' : null"
      [attr.aria-label]="overflowing() ? label() + ' (scrolls sideways)' : null"
      [attr.tabindex]="overflowing() ? 0 : null"
      (scroll)="measure()"
      data-testid="table-scroll"
      [attr.data-cut]="cutStart() && cutEnd() ? 'both' : cutStart() ? 'start' : cutEnd() ? 'end' : null"
    >
      <ng-content />
    </div>
    <div class="eq-ts__shade eq-ts__shade--start" [class.eq-ts__shade--on]="cutStart()" aria-hidden="true">
      <button type="button" class="eq-ts__arrow" tabindex="-1" (click)="page(-1)">‹</button>
    </div>
    <div class="eq-ts__shade eq-ts__shade--end" [class.eq-ts__shade--on]="cutEnd()" aria-hidden="true">
      <button type="button" class="eq-ts__arrow" tabindex="-1" (click)="page(1)">›</button>
    </div>
  `,
  styleUrl: './table-scroll.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TableScroll {
  /** What the table holds, e.g. "Received files": the region's accessible name while it scrolls. */
  readonly label = input.required<string>();

  private readonly scroller = viewChild.required<ElementRef<HTMLElement>>('scroller');
  protected readonly overflowing = signal(false);
  protected readonly cutStart = signal(false);
  protected readonly cutEnd = signal(false);

  constructor() {
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      const el = this.scroller().nativeElement;
      // Measuring here would force a layout in the middle of rendering the page; the observer's first
      // call comes once the browser has laid the page out anyway.
      if (typeof ResizeObserver === 'undefined') {
        this.measure();
        return;
      }
      const observer = new ResizeObserver(() => this.measure());
      observer.observe(el);
      // The table itself grows and shrinks as rows and columns come and go.
      const watchChildren = () => {
        for (const child of Array.from(el.children)) observer.observe(child);
      };
      watchChildren();
      // What sticks out of the table (a mark placed outside its cell) changes the width to scroll without
      // resizing any box: measured again in the next frame after the content changes, where the browser
      // lays the page out anyway.
      let frame: number | null = null;
      const measureNextFrame = () => {
        frame ??= requestAnimationFrame(() => {
          frame = null;
          this.measure();
        });
      };
      const mutations = new MutationObserver((records) => {
        if (records.some((r) => r.target === el)) watchChildren();
        measureNextFrame();
      });
      mutations.observe(el, { childList: true, subtree: true });
      destroyRef.onDestroy(() => {
        observer.disconnect();
        mutations.disconnect();
        if (frame !== null) cancelAnimationFrame(frame);
      });
    });
  }

  /** Whether the content is wider than the frame, and which edges hide some of it. */
  protected measure(): void {
    const el = this.scroller().nativeElement;
    const hidden = el.scrollWidth - el.clientWidth;
    // scrollLeft is negative from the start in a right-to-left page.
    const from = Math.abs(el.scrollLeft);
    this.overflowing.set(hidden > SLACK_PX);
    this.cutStart.set(hidden > SLACK_PX && from > SLACK_PX);
    this.cutEnd.set(hidden > SLACK_PX && from < hidden - SLACK_PX);
  }

  /** Scroll most of a frame's width towards the end (1) or the start (-1). */
  protected page(direction: 1 | -1): void {
    const el = this.scroller().nativeElement;
    const rtl = getComputedStyle(el).direction === 'rtl' ? -1 : 1;
    el.scrollBy({ left: direction * rtl * el.clientWidth * 0.8, behavior: 'smooth' });
  }
}
