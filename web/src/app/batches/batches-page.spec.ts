import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import type { Role } from '../core/auth/user';
import { type LiveEvent, LiveEventsService, type LiveEventType } from '../core/live/live-events.service';
import { formatK } from '@equilight/analysis';
import type { Batch, BatchResultSummary } from './batch';
import { batchFixture } from './batch-fixture';
import { BATCHES_LIVE_DEBOUNCE_MS, BatchesPage } from './batches-page';

const BATCHES: Batch[] = [
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
  async function setup(role: Role = 'lab_manager') {
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
    http.expectOne('/api/batches').flush(BATCHES);
    await fixture.whenStable();
    return { fixture, http, live, el: fixture.nativeElement as HTMLElement };
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.mat-mdc-row')].map((r) => r.textContent ?? '');

  it('lists batches, most recent activity first, with state as icon and word, versions and file counts', async () => {
    const { el } = await setup();
    const list = rows(el);
    expect(list).toHaveLength(3);
    expect(list[0]).toContain('Iron–ligand Job series');
    expect(list[0]).toContain('Open');
    expect(list[0]).toContain('Job plate v2');
    expect(list[0]).toContain('Job mixtures v1');
    expect(list[0]).toContain('1 / 3');
    expect(list[1]).toContain('Reviewed');
    expect(list[2]).toContain('Approved');
    expect(el.querySelectorAll('tr.mat-mdc-row eq-batch-state-label mat-icon')).toHaveLength(3);
  });

  it('shows the QC flag count and the best fit once a batch has results', async () => {
    const { fixture, http, live, el } = await setup();
    live.events.next({ type: 'batch.updated', data: { id: 1, state: 'open' }, at: new Date().toISOString() });
    await new Promise((r) => setTimeout(r, BATCHES_LIVE_DEBOUNCE_MS + 50));
    http
      .expectOne('/api/batches')
      .flush([
        batchFixture({ summary: summaryOf({ k: 839.04, kSe: 20, kCi95: [800, 880] }) }),
        batchFixture({ id: 2, name: 'Empty run', summary: null }),
      ]);
    await fixture.whenStable();
    const qc = [...el.querySelectorAll('[data-testid="batch-qc"]')].map((c) => c.textContent?.trim());
    const best = [...el.querySelectorAll('[data-testid="batch-best"]')].map((c) => text(c));
    expect(qc).toContain('error 2 (1 error)');
    // Digits follow the interval (the shared format): 839 with a CI of 800 to 880.
    expect(best).toContain('1:1 839 L·mol⁻¹');
    expect(best).toContain('—');
  });

  it('shows a bound as a bound, a poorly determined K as its interval, and a failed fit without a number', async () => {
    const { fixture, http, live, el } = await setup();
    live.events.next({ type: 'batch.updated', data: { id: 1, state: 'open' }, at: new Date().toISOString() });
    await new Promise((r) => setTimeout(r, BATCHES_LIVE_DEBOUNCE_MS + 50));
    http.expectOne('/api/batches').flush([
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
    await fixture.whenStable();
    const cell = (id: string) =>
      text(
        el
          .querySelector(`a[href="/batches/${id}"]`)!
          .closest('tr')!
          .querySelector('[data-testid="batch-best"]'),
      );
    expect(cell('11')).toBe('1:2 > 2.1 × 10⁶ L²·mol⁻² lower bound');
    expect(cell('12')).toBe('1:1 140 to 6500 L·mol⁻¹ poorly determined');
    expect(cell('13')).toBe('1:1 did not converge');
    expect(cell('13').replace('1:1', '')).not.toMatch(/\d/);
  });

  it('filters on name, state and run id', async () => {
    const { fixture, el } = await setup();
    const input = el.querySelector<HTMLInputElement>('input[matInput]')!;
    input.value = 'approved';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
    expect(rows(el)[0]).toContain('Cobalt');
    input.value = 'run-0400';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(rows(el)[0]).toContain('Nickel');
  });

  it('sorts by name when the header is clicked', async () => {
    const { fixture, el } = await setup();
    el.querySelector<HTMLElement>('th.mat-column-name .mat-sort-header-container')!.click();
    await fixture.whenStable();
    expect(rows(el)[0]).toContain('Cobalt');
  });

  it('offers "New batch" to lab managers but not to scientists', async () => {
    const { el } = await setup('lab_manager');
    expect(el.querySelector('[data-testid="new-batch"]')).not.toBeNull();
    TestBed.resetTestingModule();
    const scientist = await setup('scientist');
    expect(scientist.el.querySelector('[data-testid="new-batch"]')).toBeNull();
  });

  it('fetches the list again once after a burst of live events', async () => {
    const { fixture, http, live, el } = await setup();
    const at = new Date().toISOString();
    live.events.next({ type: 'file.stored', data: { id: 9, batchId: 1, status: 'stored' }, at });
    live.events.next({ type: 'batch.updated', data: { id: 1, state: 'open' }, at });
    live.events.next({ type: 'file.quarantined', data: { id: 10 }, at });
    await new Promise((r) => setTimeout(r, BATCHES_LIVE_DEBOUNCE_MS + 50));
    http.expectOne('/api/batches').flush([batchFixture({ fileCount: 2 })]);
    http.verify();
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
    expect(rows(el)[0]).toContain('2 / 3');
  });

  it('shows the API error when the list cannot be loaded, and refreshes on request', async () => {
    const { fixture, http, el } = await setup();
    const refresh = el.querySelector<HTMLButtonElement>('[data-testid="refresh-batches"]')!;
    refresh.click();
    http
      .expectOne('/api/batches')
      .flush(
        { error: { code: 'internal', message: 'The database is busy.' } },
        { status: 500, statusText: 'Error' },
      );
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('The database is busy.');
    refresh.click();
    http.expectOne('/api/batches').flush(BATCHES);
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(rows(el)).toHaveLength(3);
  });
});
