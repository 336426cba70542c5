import { provideHttpClient } from '@angular/common/http';
import {
  HttpTestingController,
  type TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { type WritableSignal, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { Subject } from 'rxjs';
import { type LiveEvent, LiveEventsService } from '../core/live/live-events.service';
import type { IntakeFile } from './intake-file';
import { IntakePage } from './intake-page';

const HASH = 'a3f1c09be27d4410c5e8f7a6b3d2e1f0a9b8c7d6e5f4a3b2c1d0e9f8a7b6c5d4';

function file(id: number, changes: Partial<IntakeFile> = {}): IntakeFile {
  return {
    id,
    profileId: 1,
    profileName: 'Reader A',
    originalName: `run-${id}.csv`,
    sha256: HASH,
    sizeBytes: 12_400,
    status: 'stored',
    duplicateOfId: null,
    error: null,
    warnings: [],
    runId: `R${id}`,
    batchId: null,
    readingCount: 96,
    source: 'watcher',
    receivedAt: '2031-04-02T09:00:00Z',
    finishedAt: '2031-04-02T09:00:01Z',
    ...changes,
  };
}

const FILES = [
  file(3, {
    status: 'quarantined',
    error: 'run-3.csv line 5, column "absorbance": expected a number, found "n/a"',
    readingCount: 0,
    finishedAt: '2031-04-02T09:00:02Z',
  }),
  file(2, { status: 'duplicate', duplicateOfId: 1, readingCount: 0 }),
  file(1, { sizeBytes: 812 }),
];

const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('IntakePage', () => {
  let events: Subject<LiveEvent>;
  let connected: WritableSignal<boolean>;

  async function setup() {
    events = new Subject<LiveEvent>();
    connected = signal(true);
    TestBed.configureTestingModule({
      imports: [IntakePage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        // The socket itself is tested in its own spec; here only its stream matters.
        { provide: LiveEventsService, useValue: { events$: events.asObservable(), connected } },
      ],
    });
    const fixture = TestBed.createComponent(IntakePage);
    await fixture.whenStable();
    const http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/instruments/summary').flush([]);
    expectList(http).flush({ items: FILES, total: 60 });
    await fixture.whenStable();
    return { fixture, http, el: fixture.nativeElement as HTMLElement };
  }

  function expectList(http: HttpTestingController): TestRequest {
    return http.expectOne((req) => req.url === '/api/intake');
  }

  function params(req: TestRequest): Record<string, string> {
    const p = req.request.params;
    return Object.fromEntries(p.keys().map((k) => [k, p.get(k) ?? '']));
  }

  afterEach(() => {
    document.querySelectorAll('.cdk-overlay-container').forEach((c) => (c.innerHTML = ''));
  });

  const rows = (el: HTMLElement) => [...el.querySelectorAll('tr.mat-mdc-row')] as HTMLElement[];
  const overlay = () => document.querySelector('.cdk-overlay-container') as HTMLElement;

  it('asks for the newest files first, 25 a page', async () => {
    events = new Subject<LiveEvent>();
    TestBed.configureTestingModule({
      imports: [IntakePage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: LiveEventsService, useValue: { events$: events, connected: signal(false) } },
      ],
    });
    const fixture = TestBed.createComponent(IntakePage);
    await fixture.whenStable();
    const http = TestBed.inject(HttpTestingController);
    expect(params(expectList(http))).toEqual({ sort: 'receivedAt', dir: 'desc', page: '0', pageSize: '25' });
    expect(
      (fixture.nativeElement as HTMLElement).querySelector('[data-testid=live-state]')?.textContent,
    ).toContain('Not live');
  });

  it('shows state in words with an icon, size with its unit, a short hash with the full one in the title', async () => {
    const { el } = await setup();
    const [quarantined, duplicate, stored] = rows(el);
    expect(quarantined.textContent).toContain('Quarantined');
    expect(quarantined.querySelector('mat-icon')?.textContent).toBe('report');
    expect(quarantined.textContent).toContain('expected a number, found "n/a"');
    expect(duplicate.textContent).toContain('Duplicate');
    expect(duplicate.textContent).toContain('of #1');
    expect(stored.textContent).toContain('Stored');
    expect(quarantined.textContent).toContain('12.4 kB');
    expect(stored.textContent).toContain('812 B');
    const hash = stored.querySelector('td.mat-column-sha256 code')!;
    expect(hash.textContent).toBe('a3f1c09be27d…');
    expect(hash.getAttribute('title')).toBe(HASH);
    expect(stored.textContent).toContain('R1');
    expect(stored.textContent).toContain('96');
    expect(el.querySelector('[data-testid=live-state]')?.textContent).toContain('Live');
    expect(el.querySelector('.mat-mdc-paginator')?.textContent).toContain('of 60');
  });

  it('asks the server to sort, page and filter, and goes back to the first page on a new filter', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLElement>('th.mat-column-sizeBytes .mat-sort-header-container')!.click();
    await fixture.whenStable();
    let req = expectList(http);
    expect(params(req)).toMatchObject({ sort: 'sizeBytes', dir: 'asc', page: '0' });
    req.flush({ items: FILES, total: 60 });
    await fixture.whenStable();

    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    await fixture.whenStable();
    req = expectList(http);
    expect(params(req)).toMatchObject({ sort: 'sizeBytes', page: '1', pageSize: '25' });
    req.flush({ items: FILES, total: 60 });
    await fixture.whenStable();

    const input = el.querySelector<HTMLInputElement>('[data-testid=intake-filter]')!;
    input.value = 'run-4';
    input.dispatchEvent(new Event('input'));
    input.value = ' run-42 ';
    input.dispatchEvent(new Event('input'));
    await wait(350);
    await fixture.whenStable();
    req = expectList(http); // one request for the typing burst
    expect(params(req)).toMatchObject({ q: 'run-42', page: '0' });
    req.flush({ items: [], total: 0 });
    await fixture.whenStable();
    expect(el.textContent).toContain('No files match.');
  });

  it('filters by status through the select', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLElement>('[data-testid=intake-status-filter] .mat-mdc-select-trigger')!.click();
    await fixture.whenStable();
    const option = [...overlay().querySelectorAll<HTMLElement>('mat-option')].find((o) =>
      o.textContent?.includes('Quarantined'),
    )!;
    option.click();
    await fixture.whenStable();
    const req = expectList(http);
    expect(params(req)).toMatchObject({ status: 'quarantined', page: '0' });
    req.flush({ items: [FILES[0]], total: 1 });
  });

  it('when files change on the server then refreshes the current page once per burst of events', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    await fixture.whenStable();
    expectList(http).flush({ items: FILES, total: 60 });
    await fixture.whenStable();
    for (const type of ['file.received', 'file.stored', 'file.quarantined'] as const) {
      events.next({ type, data: { id: 4 }, at: '2031-04-02T09:01:00Z' });
    }
    events.next({ type: 'batch.updated', data: { id: 9 }, at: '2031-04-02T09:01:00Z' });
    http.expectNone((req) => req.url === '/api/intake');
    await wait(350);
    await fixture.whenStable();
    const req = expectList(http);
    expect(params(req)).toMatchObject({ page: '1', sort: 'receivedAt' }); // the page being looked at
    req.flush({ items: [file(4), ...FILES], total: 61 });
    await fixture.whenStable();
    http.expectNone((r) => r.url === '/api/intake');
    expect(rows(el)).toHaveLength(4);
    expect(rows(el)[0].textContent).toContain('run-4.csv');
  });

  it('when a batch event alone arrives then does not refresh', async () => {
    const { http } = await setup();
    events.next({ type: 'batch.updated', data: { id: 9 }, at: '2031-04-02T09:01:00Z' });
    await wait(350);
    http.expectNone((req) => req.url === '/api/intake');
  });

  it('when the live connection comes back then catches up with one refresh', async () => {
    const { fixture, http, el } = await setup();
    connected.set(false);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=live-state]')?.textContent).toContain('Not live');
    http.expectNone((req) => req.url === '/api/intake');
    connected.set(true);
    await fixture.whenStable();
    expectList(http).flush({ items: FILES, total: 60 });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=live-state]')?.textContent).toContain('Live');
  });

  it('re-queues a quarantined file and lists again', async () => {
    const { fixture, http, el } = await setup();
    const buttons = el.querySelectorAll<HTMLButtonElement>('[data-testid=requeue]');
    expect(buttons).toHaveLength(1);
    buttons[0].click();
    http
      .expectOne({ method: 'POST', url: '/api/intake/3/requeue' })
      .flush({ ...FILES[0], status: 'queued', error: null }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
    expectList(http).flush({ items: FILES, total: 60 });
  });

  it('when the list fails then shows the server message', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLButtonElement>('button[aria-label="Refresh the list"]')!.click();
    expectList(http).flush(
      { error: { code: 'bad_request', message: 'Unknown sort column.' } },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=intake-error]')?.textContent).toContain('Unknown sort column.');
  });
});
