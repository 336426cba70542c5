import { provideHttpClient } from '@angular/common/http';
import {
  HttpTestingController,
  type TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import type { Role } from '../core/auth/user';
import { type LiveEvent, LiveEventsService, type LiveEventType } from '../core/live/live-events.service';
import { formatK } from '@equilight/analysis';
import type { BatchListItem, BatchResultSummary } from './batch';
import { batchListItemFixture as batchFixture } from './batch-fixture';
import { BATCHES_LIVE_DEBOUNCE_MS, BATCHES_SEARCH_DEBOUNCE_MS, BatchesPage } from './batches-page';

const BATCHES: BatchListItem[] = [
  batchFixture(),
  batchFixture({
    id: 2,
    name: 'Cobalt excess series',
    state: 'approved',
    runId: 'RUN-0388',
    fileCount: 2,
    expectedFiles: 2,
    lastActivityAt: '2026-02-20T10:00:00.000Z',
  }),
  batchFixture({
    id: 3,
    name: 'Nickel check',
    state: 'reviewed',
    runId: 'RUN-0400',
    lastActivityAt: '2026-02-25T10:00:00.000Z',
  }),
];

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

/** A batch list summary as the server's summarize() writes it (its K text from the shared format). */
function summaryOf(change: Partial<BatchResultSummary>): BatchResultSummary {
  const base: BatchResultSummary = {
    qcFlagCount: 2,
    qcErrorCount: 1,
    best: '1:1',
    k: null,
    kSe: null,
    kCi95: null,
    kStatus: 'determined',
    kLowerBound95: null,
    kUpperBound95: null,
    kUnit: 'L·mol⁻¹',
    kText: null,
    ...change,
  };
  return {
    ...base,
    kText:
      change.kText ??
      formatK({
        model: base.best ?? '1:1',
        status: base.kStatus ?? 'not-determined',
        k: base.k,
        kCi95: base.kCi95,
        kLowerBound95: base.kLowerBound95,
        kUpperBound95: base.kUpperBound95,
      }),
  };
}

class FakeLive {
  readonly events = new Subject<LiveEvent>();
  readonly connected = signal(true);
  ofType<T extends LiveEventType>(...types: T[]) {
    return this.events.pipe(filter((e): e is LiveEvent<T> => (types as string[]).includes(e.type)));
  }
}

describe('BatchesPage', () => {
  const pageOf = (items: BatchListItem[], total = items.length) => ({ items, total });
  const list = (http: HttpTestingController): TestRequest => http.expectOne((r) => r.url === '/api/batches');
  const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));

  async function setup(role: Role = 'lab_manager', first: BatchListItem[] = BATCHES) {
    const live = new FakeLive();
    TestBed.configureTestingModule({
      imports: [BatchesPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: LiveEventsService, useValue: live },
        { provide: AuthService, useValue: { hasRole: (...roles: Role[]) => roles.includes(role) } },
      ],
    });
    const fixture = TestBed.createComponent(BatchesPage);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    await fixture.whenStable();
    const req = list(http);
    req.flush(pageOf(first));
    await fixture.whenStable();
    return { fixture, http, live, el: fixture.nativeElement as HTMLElement, firstRequest: req.request };
  }

  /** A live event, then the page's one fetch after the quiet time, answered with `items`. */
  async function liveRefresh(
    ctx: { fixture: { whenStable(): Promise<unknown> }; http: HttpTestingController; live: FakeLive },
    items: BatchListItem[],
  ) {
    ctx.live.events.next({
      type: 'batch.updated',
      data: { id: items[0]?.id ?? 1 },
      at: new Date().toISOString(),
    });
    await wait(BATCHES_LIVE_DEBOUNCE_MS + 50);
    list(ctx.http).flush(pageOf(items));
    await ctx.fixture.whenStable();
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.mat-mdc-row')].map((r) => r.textContent ?? '');
  const rowIds = (el: HTMLElement) =>
    [...el.querySelectorAll('tr[data-batch-id]')].map((r) => Number(r.getAttribute('data-batch-id')));

  it('asks the server for the first page, most recent activity first', async () => {
    const { firstRequest } = await setup();
    expect(firstRequest.params.get('sort')).toBe('lastActivityAt');
    expect(firstRequest.params.get('dir')).toBe('desc');
    expect(firstRequest.params.get('page')).toBe('0');
    expect(firstRequest.params.get('pageSize')).toBe('25');
    expect(firstRequest.params.has('q')).toBe(false);
  });

  it('lists batches in the order the server sent, with state as icon and word, versions and file counts', async () => {
    const { el } = await setup();
    const shown = rows(el);
    expect(shown).toHaveLength(3);
    expect(shown[0]).toContain('Iron–ligand Job series');
    expect(shown[0]).toContain('Open');
    expect(shown[0]).toContain('Job plate v2');
    expect(shown[0]).toContain('Job mixtures v1');
    expect(shown[0]).toContain('1 / 3');
    expect(shown[1]).toContain('Approved');
    expect(shown[2]).toContain('Reviewed');
    expect(el.querySelectorAll('tr.mat-mdc-row eq-batch-state-label mat-icon')).toHaveLength(3);
  });

  it('shows the QC flag count and the best fit once a batch has results, and says when it is being analysed', async () => {
    const ctx = await setup();
    await liveRefresh(ctx, [
      batchFixture({ summary: summaryOf({ k: 839.04, kSe: 20, kCi95: [800, 880] }) }),
      batchFixture({ id: 2, name: 'Empty run', summary: null, fileCount: 1, summaryState: 'pending' }),
      batchFixture({
        id: 3,
        name: 'Broken',
        summary: null,
        summaryState: 'failed',
        summaryError: 'no standards',
      }),
    ]);
    const qc = [...ctx.el.querySelectorAll('[data-testid="batch-qc"]')].map((c) => c.textContent?.trim());
    const best = [...ctx.el.querySelectorAll('[data-testid="batch-best"]')].map((c) => text(c));
    expect(qc).toContain('error 2 (1 error)');
    // Digits follow the interval (the shared format): 839 with a CI of 800 to 880.
    expect(best[0]).toBe('1:1 839 L·mol⁻¹');
    expect(best[1]).toBe('— pending being analysed');
    expect(best[2]).toBe('error analysis fails');
  });

  it('shows a bound as a bound, a poorly determined K as its interval, and a failed fit without a number', async () => {
    const ctx = await setup('lab_manager', []);
    await liveRefresh(ctx, [
      batchFixture({
        id: 11,
        name: 'Bound',
        summary: summaryOf({
          best: '1:2',
          kStatus: 'lower-bound',
          kCi95: [1.2e6, null],
          kLowerBound95: 2.1e6,
          kUnit: 'L²·mol⁻²',
        }),
      }),
      batchFixture({
        id: 12,
        name: 'Wide',
        summary: summaryOf({ kStatus: 'poorly-determined', k: 950, kCi95: [140, 6500] }),
      }),
      batchFixture({
        id: 13,
        name: 'Failed',
        summary: summaryOf({
          kStatus: 'not-converged',
          k: null,
          kCi95: null,
          kText: 'did not converge: the equilibrium solver did not converge for every mixture',
        }),
      }),
    ]);
    const cell = (id: string) =>
      text(
        ctx.el
          .querySelector(`a[href="/batches/${id}"]`)!
          .closest('tr')!
          .querySelector('[data-testid="batch-best"]'),
      );
    expect(cell('11')).toBe('1:2 > 2.1 × 10⁶ L²·mol⁻² lower bound');
    expect(cell('12')).toBe('1:1 140 to 6500 L·mol⁻¹ poorly determined');
    expect(cell('13')).toBe('1:1 did not converge');
    expect(cell('13').replace('1:1', '')).not.toMatch(/\d/);
  });

  it('searches on the server after a pause in typing, from the first page', async () => {
    const { fixture, http, el } = await setup();
    const input = el.querySelector<HTMLInputElement>('[data-testid="batches-search"]')!;
    expect(el.querySelector('.eq-filter-text mat-label')!.textContent).toBe('Sample id, run id or file name');
    for (const typed of ['S', 'ST', 'STD-1']) {
      input.value = typed;
      input.dispatchEvent(new Event('input'));
    }
    await wait(BATCHES_SEARCH_DEBOUNCE_MS + 50);
    await fixture.whenStable();
    const req = list(http);
    expect(req.request.params.get('q')).toBe('STD-1');
    expect(req.request.params.get('page')).toBe('0');
    req.flush(pageOf([BATCHES[2]!]));
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
    expect(rows(el)[0]).toContain('Nickel');
    http.verify();
  });

  it('sorts on the server when a header is clicked', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLElement>('th.mat-column-name .mat-sort-header-container')!.click();
    await fixture.whenStable();
    const req = list(http);
    expect(req.request.params.get('sort')).toBe('name');
    expect(req.request.params.get('dir')).toBe('asc');
    req.flush(pageOf([BATCHES[1]!, BATCHES[0]!, BATCHES[2]!]));
    await fixture.whenStable();
    expect(rows(el)[0]).toContain('Cobalt');
    el.querySelector<HTMLElement>('th.mat-column-best .mat-sort-header-container')!.click();
    await fixture.whenStable();
    expect(list(http).request.params.get('sort')).toBe('k');
  });

  it('offers "New batch" to lab managers but not to scientists', async () => {
    const { el } = await setup('lab_manager');
    expect(el.querySelector('[data-testid="new-batch"]')).not.toBeNull();
    TestBed.resetTestingModule();
    const scientist = await setup('scientist');
    expect(scientist.el.querySelector('[data-testid="new-batch"]')).toBeNull();
  });

  it('fetches the list again once after a burst of live events, and updates the rows where they stand', async () => {
    const ctx = await setup();
    const at = new Date().toISOString();
    ctx.live.events.next({ type: 'file.stored', data: { id: 9, batchId: 1, status: 'stored' }, at });
    ctx.live.events.next({ type: 'batch.updated', data: { id: 1, state: 'open' }, at });
    ctx.live.events.next({ type: 'file.quarantined', data: { id: 10 }, at });
    await wait(BATCHES_LIVE_DEBOUNCE_MS + 50);
    list(ctx.http).flush(pageOf([batchFixture({ fileCount: 2 }), BATCHES[1]!, BATCHES[2]!]));
    ctx.http.verify();
    await ctx.fixture.whenStable();
    expect(rows(ctx.el)).toHaveLength(3);
    expect(rows(ctx.el)[0]).toContain('2 / 3');
  });

  it('while the pointer is in the table, live events change rows in place and never move them', async () => {
    const ctx = await setup();
    const wrap = ctx.el.querySelector<HTMLElement>('.eq-table-wrap')!;
    const firstRow = ctx.el.querySelector('tr[data-batch-id="1"]');
    wrap.dispatchEvent(new Event('pointerenter'));
    // Batch 3 got a file: the server now sorts it first.
    await liveRefresh(ctx, [
      batchFixture({ id: 3, name: 'Nickel check', state: 'reviewed', fileCount: 3 }),
      BATCHES[0]!,
      BATCHES[1]!,
    ]);
    expect(rowIds(ctx.el)).toEqual([1, 2, 3]);
    expect(rows(ctx.el)[2]).toContain('3 / 3');
    // The same row element: updated, not re-created.
    expect(ctx.el.querySelector('tr[data-batch-id="1"]')).toBe(firstRow);
    expect(ctx.el.querySelector('[data-testid="show-new-batches"]')).toBeNull();
    // Once the pointer leaves, the server's order shows.
    wrap.dispatchEvent(new Event('pointerleave'));
    await ctx.fixture.whenStable();
    expect(rowIds(ctx.el)).toEqual([3, 1, 2]);
  });

  it('while the keyboard is in the table, new batches are announced and held back until asked for', async () => {
    const ctx = await setup();
    ctx.el.querySelector<HTMLAnchorElement>('a[href="/batches/2"]')!.focus();
    ctx.el.querySelector('.eq-table-wrap')!.dispatchEvent(new FocusEvent('focusin'));
    const fresh = [
      batchFixture({ id: 21, name: 'Zinc titration' }),
      batchFixture({ id: 22, name: 'Copper titration' }),
      ...BATCHES,
    ];
    await liveRefresh(ctx, fresh);
    expect(rowIds(ctx.el)).toEqual([1, 2, 3]);
    const announced = ctx.el.querySelector('[data-testid="batches-announcement"]')!;
    expect(announced.getAttribute('aria-live')).toBe('polite');
    expect(text(announced)).toBe('2 new batches on this page. Use “Show” to see them.');
    const show = ctx.el.querySelector<HTMLButtonElement>('[data-testid="show-new-batches"]')!;
    expect(text(show)).toBe('north 2 new batches — show');
    show.click();
    await ctx.fixture.whenStable();
    expect(rowIds(ctx.el)).toEqual([21, 22, 1, 2, 3]);
    expect(ctx.el.querySelector('[data-testid="show-new-batches"]')).toBeNull();
  });

  it('filters by state on the server', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLElement>('[data-testid="batches-state"] .mat-mdc-select-trigger')!.click();
    await fixture.whenStable();
    const reviewed = [...document.querySelectorAll<HTMLElement>('mat-option')].find((o) =>
      o.textContent?.includes('Reviewed'),
    )!;
    reviewed.click();
    await fixture.whenStable();
    const req = list(http);
    expect(req.request.params.get('state')).toBe('reviewed');
    req.flush(pageOf([BATCHES[2]!]));
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
  });

  it('shows the API error when the list cannot be loaded, and refreshes on request', async () => {
    const { fixture, http, el } = await setup();
    const refresh = el.querySelector<HTMLButtonElement>('[data-testid="refresh-batches"]')!;
    refresh.click();
    list(http).flush(
      { error: { code: 'internal', message: 'The database is busy.' } },
      { status: 500, statusText: 'Error' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('The database is busy.');
    refresh.click();
    list(http).flush(pageOf(BATCHES));
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(rows(el)).toHaveLength(3);
  });
});
