import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { randomSecret, receiverUrlError } from './webhook-dialog';
import { WebhooksPage } from './webhooks-page';

const HOOKS = [
  {
    id: 1,
    url: 'https://lims.example.org/hooks/equilight',
    events: ['batch.approved', 'batch.qc_failed'],
    active: true,
    secretMasked: '••••••••c21e',
    createdAt: '2026-03-02T09:00:00.000Z',
    updatedAt: '2026-03-02T09:00:00.000Z',
    counts: { pending: 0, delivered: 4, failed: 1 },
  },
];

const DELIVERIES = [
  {
    id: 12,
    eventId: '6f1c2d3e-4b5a-5c6d-8e7f-0a1b2c3d4e5f',
    event: 'batch.qc_failed',
    webhookId: 1,
    url: HOOKS[0]!.url,
    status: 'failed',
    attempts: 6,
    lastResponseCode: 503,
    lastError: 'The receiver answered HTTP 503: try later',
    createdAt: '2026-03-02T10:00:00.000Z',
    lastAttemptAt: '2026-03-02T10:16:00.000Z',
    deliveredAt: null,
    payload: {},
  },
  {
    id: 11,
    eventId: '0a9b8c7d-6e5f-5a4b-9c3d-2e1f0a9b8c7d',
    event: 'batch.approved',
    webhookId: 1,
    url: HOOKS[0]!.url,
    status: 'pending',
    attempts: 1,
    lastResponseCode: null,
    lastError: 'No answer within 10 s',
    createdAt: '2026-03-02T09:30:00.000Z',
    lastAttemptAt: '2026-03-02T09:30:10.000Z',
    deliveredAt: null,
    payload: {},
  },
];

describe('WebhooksPage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [WebhooksPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(WebhooksPage);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/webhooks').flush(HOOKS);
    http.expectOne('/api/webhooks/deliveries?page=0&pageSize=25').flush({ items: DELIVERIES, total: 2 });
    await fixture.whenStable();
    fixture.detectChanges();
    return { fixture, http, el: fixture.nativeElement as HTMLElement };
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('[data-testid="deliveries-table"] tbody tr')].map((r) => r.textContent ?? '');

  it('lists the receivers with their events, masked secret and counts', async () => {
    const { el } = await setup();
    const list = el.querySelector('[data-testid="webhooks-list"]')!.textContent!;
    expect(list).toContain('https://lims.example.org/hooks/equilight');
    expect(list).toContain('Batch approved');
    expect(list).toContain('Batch failed QC');
    expect(list).toContain('••••••••c21e');
    expect(list).toMatch(/4 delivered\s*1 failed\s*0 pending/);
  });

  it('shows each delivery with status in words, response code and tries; only final ones can be sent again', async () => {
    const { el } = await setup();
    expect(rows(el)).toHaveLength(2);
    const cells = [...el.querySelectorAll('[data-testid="deliveries-table"] tbody tr')][0]!.querySelectorAll(
      'td',
    );
    expect([3, 4, 5].map((i) => cells[i]!.textContent!.replace(/\s+/g, ' ').trim())).toEqual([
      'error Failed The receiver answered HTTP 503: try later',
      '503',
      '6',
    ]);
    expect(rows(el)[1]).toContain('Pending');
    expect(el.querySelectorAll('[data-testid="delivery-resend"]')).toHaveLength(1);
  });

  it('sends a failed delivery again and shows it pending', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLButtonElement>('[data-testid="delivery-resend"]')!.click();
    const req = http.expectOne('/api/webhooks/deliveries/12/resend');
    expect(req.request.method).toBe('POST');
    req.flush({ ...DELIVERIES[0], status: 'pending' }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
    fixture.detectChanges();
    expect(rows(el)[0]).toContain('Pending');
    expect(el.querySelectorAll('[data-testid="delivery-resend"]')).toHaveLength(0);
  });

  it('asks the server for failed deliveries only when that filter is chosen', async () => {
    const { fixture, http, el } = await setup();
    const failed = [...el.querySelectorAll<HTMLButtonElement>('mat-button-toggle button')].find((b) =>
      b.textContent?.includes('Failed'),
    )!;
    failed.click();
    http
      .expectOne('/api/webhooks/deliveries?page=0&pageSize=25&status=failed')
      .flush({ items: [DELIVERIES[0]], total: 1 });
    await fixture.whenStable();
    fixture.detectChanges();
    expect(rows(el)).toHaveLength(1);
  });
});

describe('webhook receiver URL rule (the same as the server)', () => {
  it('takes https anywhere and http only to this machine', () => {
    expect(receiverUrlError('https://lims.example.org/hooks')).toBeNull();
    expect(receiverUrlError('http://127.0.0.1:8080/hooks')).toBeNull();
    expect(receiverUrlError('http://localhost/hooks')).toBeNull();
    expect(receiverUrlError('http://[::1]:9000/')).toBeNull();
    expect(receiverUrlError('http://lims.example.org/hooks')).toMatch(/Use https/);
    expect(receiverUrlError('ftp://lims.example.org/')).toMatch(/https/);
    expect(receiverUrlError('lims')).toMatch(/full URL/);
  });

  it('generates 256-bit secrets as 64 hex characters, different each time', () => {
    const a = randomSecret();
    expect(a).toMatch(/^[0-9a-f]{64}$/);
    expect(randomSecret()).not.toBe(a);
  });
});
