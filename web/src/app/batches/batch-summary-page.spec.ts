import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import { type LiveEvent, LiveEventsService, type LiveEventType } from '../core/live/live-events.service';
import { batchFixture } from './batch-fixture';
import { BatchSummaryPage } from './batch-summary-page';
import { BATCHES_LIVE_DEBOUNCE_MS } from './batches-page';

describe('BatchSummaryPage', () => {
  async function setup() {
    const events = new Subject<LiveEvent>();
    const live = {
      connected: signal(true),
      ofType: <T extends LiveEventType>(...types: T[]) =>
        events.pipe(filter((e): e is LiveEvent<T> => (types as string[]).includes(e.type))),
    };
    TestBed.configureTestingModule({
      imports: [BatchSummaryPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: LiveEventsService, useValue: live },
      ],
    });
    const fixture = TestBed.createComponent(BatchSummaryPage);
    fixture.componentRef.setInput('id', '1');
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    await fixture.whenStable();
    http.expectOne('/api/batches/1').flush(batchFixture());
    await fixture.whenStable();
    return { fixture, http, events, el: fixture.nativeElement as HTMLElement };
  }

  it('shows the state, files and settings with units', async () => {
    const { el } = await setup();
    const text = el.textContent!.replace(/\s+/g, ' ');
    expect(text).toContain('Iron–ligand Job series');
    expect(text).toContain('Open');
    expect(el.querySelector('[data-testid="summary-files"]')!.textContent).toContain('1 / 3');
    expect(text).toContain('480 nm');
    expect(text).toContain('1 cm');
    expect(text).toContain('25 °C');
    expect(text).toContain('5%');
  });

  it('fetches again when a file of this batch is stored, not for other batches', async () => {
    const { fixture, http, events, el } = await setup();
    const at = new Date().toISOString();
    events.next({ type: 'file.stored', data: { id: 30, batchId: 2, status: 'stored' }, at });
    await new Promise((r) => setTimeout(r, BATCHES_LIVE_DEBOUNCE_MS + 50));
    http.expectNone('/api/batches/1');
    events.next({ type: 'file.stored', data: { id: 31, batchId: 1, status: 'stored' }, at });
    await new Promise((r) => setTimeout(r, BATCHES_LIVE_DEBOUNCE_MS + 50));
    http.expectOne('/api/batches/1').flush(batchFixture({ fileCount: 2 }));
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="summary-files"]')!.textContent).toContain('2 / 3');
  });
});
