import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import type { Role, User } from '../core/auth/user';
import { type LiveEvent, LiveEventsService, type LiveEventType } from '../core/live/live-events.service';
import { HomePage, OVERVIEW_LIVE_DEBOUNCE_MS, progressText, qcText } from './home-page';
import type { Overview, OverviewBatch } from './overview';

class FakeLive {
  readonly events = new Subject<LiveEvent>();
  readonly connected = signal(true);
  ofType<T extends LiveEventType>(...types: T[]) {
    return this.events.pipe(filter((e): e is LiveEvent<T> => (types as string[]).includes(e.type)));
  }
}

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

function batch(change: Partial<OverviewBatch> = {}): OverviewBatch {
  return {
    id: 7,
    name: 'Iron–ligand Job series',
    state: 'open',
    profileName: 'Reader 1',
    expectedFiles: 3,
    storedFiles: 2,
    readingCount: 192,
    lastActivityAt: '2026-03-02T09:15:00.000Z',
    qc: { state: 'known', flagCount: 2, errorCount: 1 },
    ...change,
  };
}

function overview(role: Role, change: Partial<Overview> = {}): Overview {
  const managers = role !== 'scientist';
  return {
    role,
    generatedAt: '2026-03-02T10:00:00.000Z',
    openBatches: { total: 1, items: [batch()] },
    awaitingMe: { total: 0, items: [], fourEyes: true },
    ...(managers
      ? {
          quarantinedToday: {
            since: '2026-03-02T00:00:00.000Z',
            count: 3,
            latest: [
              {
                id: 41,
                originalName: 'RUN-0412_plate.csv',
                profileName: 'Reader 1',
                receivedAt: '2026-03-02T08:00:00.000Z',
                error: 'No column named absorbance.',
              },
            ],
          },
          silentInstruments: {
            silentAfterHours: 24,
            items: [{ id: 3, name: 'Bench cuvette reader', lastSeenAt: null }],
          },
        }
      : {}),
    ...change,
  };
}

describe('HomePage (the Overview)', () => {
  async function setup(role: Role, answer: Overview = overview(role)) {
    const live = new FakeLive();
    const user: User = {
      id: 1,
      email: `${role}@lab.test`,
      displayName: 'Ada',
      role,
      active: true,
      invited: false,
    };
    TestBed.configureTestingModule({
      imports: [HomePage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: LiveEventsService, useValue: live },
        {
          provide: AuthService,
          useValue: { currentUser: signal(user), hasRole: (...roles: Role[]) => roles.includes(role) },
        },
      ],
    });
    const fixture = TestBed.createComponent(HomePage);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    const req = http.expectOne((r) => r.url === '/api/overview');
    req.flush(answer);
    await fixture.whenStable();
    return { fixture, http, live, req, el: fixture.nativeElement as HTMLElement };
  }

  it('asks for today from local midnight', async () => {
    const { req } = await setup('scientist');
    const since = new Date(req.request.params.get('since')!);
    const now = new Date();
    expect([since.getHours(), since.getMinutes(), since.getDate()]).toEqual([0, 0, now.getDate()]);
  });

  it('as a scientist shows open batches with progress and QC, and no intake or instrument card', async () => {
    const { el } = await setup('scientist');
    const item = text(el.querySelector('[data-testid="open-item"]'));
    expect(item).toContain('Iron–ligand Job series');
    expect(item).toContain('2 / 3 files · 192 readings');
    expect(item).toContain('QC: 2 findings (1 error)');
    expect(el.querySelector('[data-testid="open-item"] a')?.getAttribute('href')).toBe('/batches/7');
    expect(el.querySelector('[data-testid="quarantine-card"]')).toBeNull();
    expect(el.querySelector('[data-testid="silent-card"]')).toBeNull();
    expect(text(el.querySelector('[data-testid="awaiting-card"]'))).toContain('Nothing awaits your review.');
  });

  it('as a lab manager shows what to approve, today’s quarantine with a link to Intake, and silent instruments', async () => {
    const { el } = await setup(
      'lab_manager',
      overview('lab_manager', {
        awaitingMe: {
          total: 1,
          items: [{ ...batch({ id: 9, state: 'reviewed' }), action: 'approve' }],
          fourEyes: true,
        },
      }),
    );
    const awaiting = text(el.querySelector('[data-testid="awaiting-card"]'));
    expect(awaiting).toContain('Approve');
    expect(awaiting).toContain('approved by another lab manager');
    expect(text(el.querySelector('[data-testid="quarantine-count"]'))).toBe('3');
    expect(text(el.querySelector('[data-testid="quarantine-card"]'))).toContain('RUN-0412_plate.csv');
    const intake = [...el.querySelectorAll('[data-testid="quarantine-card"] a')].map((a) =>
      a.getAttribute('href'),
    );
    expect(intake).toContain('/intake?status=quarantined');
    expect(text(el.querySelector('[data-testid="silent-item"]'))).toContain('Never sent a file');
    // The Instruments page is the administrators': a lab manager gets no link to it.
    expect(el.querySelector('[data-testid="silent-card"] a[href="/instruments"]')).toBeNull();
  });

  it('as an admin says why nothing awaits review and links to Instruments', async () => {
    const { el } = await setup('admin');
    expect(text(el.querySelector('[data-testid="awaiting-card"]'))).toContain(
      'Administrators neither review nor approve batches',
    );
    expect(el.querySelector('[data-testid="silent-card"] a[href="/instruments"]')).not.toBeNull();
  });

  it('says so in words when nothing is open, quarantined or silent', async () => {
    const { el } = await setup(
      'lab_manager',
      overview('lab_manager', {
        openBatches: { total: 0, items: [] },
        quarantinedToday: { since: '2026-03-02T00:00:00.000Z', count: 0, latest: [] },
        silentInstruments: { silentAfterHours: 24, items: [] },
      }),
    );
    expect(text(el.querySelector('[data-testid="open-card"]'))).toContain('No batch is open');
    expect(text(el.querySelector('[data-testid="quarantine-card"]'))).toContain(
      'No file was quarantined today.',
    );
    expect(text(el.querySelector('[data-testid="silent-card"]'))).toContain(
      'Every active instrument sent a file in the last 24 hours.',
    );
  });

  it('fetches again after live events, one request per burst, and the last answer wins', async () => {
    const { fixture, http, live, el } = await setup('scientist');
    const at = new Date().toISOString();
    live.events.next({ type: 'file.stored', data: { id: 1 }, at });
    live.events.next({ type: 'batch.updated', data: { id: 7 }, at });
    await new Promise((r) => setTimeout(r, OVERVIEW_LIVE_DEBOUNCE_MS + 50));
    const first = http.expectOne((r) => r.url === '/api/overview');
    // A second burst before the first answer: the first request is dropped.
    live.events.next({ type: 'batch.updated', data: { id: 7 }, at });
    await new Promise((r) => setTimeout(r, OVERVIEW_LIVE_DEBOUNCE_MS + 50));
    expect(first.cancelled).toBe(true);
    http
      .expectOne((r) => r.url === '/api/overview')
      .flush(overview('scientist', { openBatches: { total: 1, items: [batch({ storedFiles: 3 })] } }));
    await fixture.whenStable();
    expect(text(el.querySelector('[data-testid="open-item"]'))).toContain('3 / 3 files');
  });

  it('words progress and QC states', () => {
    expect(progressText({ storedFiles: 1, expectedFiles: 0, readingCount: 1 })).toBe('1 file · 1 reading');
    expect(qcText({ state: 'no-files', flagCount: null, errorCount: null })).toBe('No files yet');
    expect(qcText({ state: 'not-analysed', flagCount: null, errorCount: null })).toMatch(
      /not worked out yet/,
    );
    expect(qcText({ state: 'known', flagCount: 0, errorCount: 0 })).toBe('QC: no findings');
    expect(qcText({ state: 'known', flagCount: 1, errorCount: 0 })).toBe('QC: 1 finding');
  });
});
