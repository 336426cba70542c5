import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import type { Role } from '../core/auth/user';
import { type LiveEvent, LiveEventsService, type LiveEventType } from '../core/live/live-events.service';
import type { Batch } from './batch';
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
    http.expectOne('/api/batches').flush([
      batchFixture({
        summary: { qcFlagCount: 2, qcErrorCount: 1, best: '1:1', k: 839.04, kSe: 20, kCi95: [800, 880] },
      }),
      batchFixture({ id: 2, name: 'Empty run', summary: null }),
    ]);
    await fixture.whenStable();
    const qc = [...el.querySelectorAll('[data-testid="batch-qc"]')].map((c) => c.textContent?.trim());
    const best = [...el.querySelectorAll('[data-testid="batch-best"]')].map((c) => c.textContent?.trim());
    expect(qc).toContain('error 2 (1 error)');
    expect(best).toContain('1:1: K = 839.0 L·mol⁻¹');
    expect(best).toContain('—');
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
