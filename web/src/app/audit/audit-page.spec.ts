import { provideHttpClient } from '@angular/common/http';
import {
  HttpTestingController,
  type TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { TestBed } from '@angular/core/testing';
import { MatDatepickerInputHarness } from '@angular/material/datepicker/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { formatDateTime } from '../shared/format/date-format';
import type { AuditEntry } from './audit-entry';
import { AUDIT_FILTER_DEBOUNCE_MS, AuditPage, endOfDayIso, startOfDayIso } from './audit-page';

const ENTRIES: AuditEntry[] = [
  {
    id: 12,
    at: '2026-03-02T10:15:00.000Z',
    actorId: 2,
    actorName: 'manager@equilight.test',
    action: 'settings',
    entity: 'batch',
    entityId: 1,
    summary: 'Changed the settings of batch "Iron–ligand Job series"',
    before: { r2Min: 0.995 },
    after: { r2Min: 0.99 },
    reason: 'Older standards are noisier',
  },
  {
    id: 11,
    at: '2026-03-01T09:00:00.000Z',
    actorId: 2,
    actorName: 'manager@equilight.test',
    action: 'create',
    entity: 'layout',
    entityId: 3,
    summary: 'Created layout "Job plate"',
    before: null,
    after: null,
    reason: null,
  },
];

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));

// Material harnesses open real overlays; on a busy two-core machine that takes seconds.
jest.setTimeout(20_000);

describe('AuditPage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [AuditPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(AuditPage);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    const first = auditRequest(http);
    expect(params(first)).toEqual({ page: '0', pageSize: '50' });
    first.flush({ items: ENTRIES, total: 120 });
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const type = async (testId: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(`[data-testid="${testId}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    return { fixture, http, el, type, loader: TestbedHarnessEnvironment.loader(fixture) };
  }

  function auditRequest(http: HttpTestingController): TestRequest {
    return http.expectOne((req) => req.url === '/api/audit' && req.method === 'GET');
  }

  function params(req: TestRequest): Record<string, string> {
    const p = req.request.params;
    return Object.fromEntries(p.keys().map((k) => [k, p.get(k)!]));
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.eq-entry-row')].map((r) => r.textContent ?? '');

  it('lists entries with time, who, action, entity and id, summary and reason', async () => {
    const { el } = await setup();
    expect(rows(el)).toHaveLength(2);
    expect(rows(el)[0]).toContain('manager@equilight.test');
    expect(rows(el)[0]).toContain('Batch #1');
    expect(rows(el)[0]).toContain('Older standards are noisier');
    expect(rows(el)[1]).toContain('Layout #3');
  });

  it('turns the filters into query parameters, once after typing stops, from page 0', async () => {
    const { fixture, http, type, loader } = await setup();
    const entity = await loader.getHarness(
      MatSelectHarness.with({ selector: '[data-testid="audit-entity"]' }),
    );
    await entity.clickOptions({ text: 'Batch' });
    const action = await loader.getHarness(
      MatSelectHarness.with({ selector: '[data-testid="audit-action"]' }),
    );
    await action.clickOptions({ text: 'settings' });
    await type('audit-entity-id', '1');
    await type('audit-text', ' noisier ');
    await type('audit-from', '2026-03-01');
    await type('audit-to', '2026-03-02');
    await wait(AUDIT_FILTER_DEBOUNCE_MS + 50);
    const req = auditRequest(http);
    expect(params(req)).toEqual({
      entity: 'batch',
      entityId: '1',
      action: 'settings',
      q: 'noisier',
      from: startOfDayIso(new Date(2026, 2, 1)),
      to: endOfDayIso(new Date(2026, 2, 2)),
      page: '0',
      pageSize: '50',
    });
    req.flush({ items: [ENTRIES[0]], total: 1 });
    http.verify();
    await fixture.whenStable();
  });

  it('picks the days with the shared Material datepicker and shows them in the app date style', async () => {
    const { fixture, http, type, el, loader } = await setup();
    const from = await loader.getHarness(
      MatDatepickerInputHarness.with({ selector: '[data-testid="audit-from"]' }),
    );
    await type('audit-from', '2026-03-01');
    await from.blur();
    // the field now shows the day in the app's date style, not the ISO text typed
    expect(await from.getValue()).toBe(formatDateTime(new Date(2026, 2, 1), 'date'));
    expect(await from.hasCalendar()).toBe(true);
    await wait(AUDIT_FILTER_DEBOUNCE_MS + 50);
    expect(params(auditRequest(http)).from).toBe(new Date(2026, 2, 1).toISOString());
    expect(el.querySelector('input[type="date"]')).toBeNull();
    await fixture.whenStable();
  });

  it('pages on the server and keeps the filters', async () => {
    const { fixture, http, type, loader } = await setup();
    await type('audit-text', 'layout');
    await wait(AUDIT_FILTER_DEBOUNCE_MS + 50);
    auditRequest(http).flush({ items: ENTRIES, total: 120 });
    await fixture.whenStable();
    const paginator = await loader.getHarness(MatPaginatorHarness);
    await paginator.goToNextPage();
    const req = auditRequest(http);
    expect(params(req)).toEqual({ q: 'layout', page: '1', pageSize: '50' });
    req.flush({ items: ENTRIES, total: 120 });
    await fixture.whenStable();
    expect(await paginator.getRangeLabel()).toMatch(/51\D+100 of 120/);
  });

  it('shows the before and after of an entry when expanded', async () => {
    const { fixture, el } = await setup();
    expect(el.querySelector('[data-testid="audit-detail"]')).toBeNull();
    el.querySelector<HTMLButtonElement>('tr.eq-entry-row button[aria-expanded]')!.click();
    await fixture.whenStable();
    const detail = el.querySelector('[data-testid="audit-detail"]')!.textContent!;
    expect(detail).toContain('"r2Min": 0.995');
    expect(detail).toContain('"r2Min": 0.99');
    // The entry without before/after offers nothing to expand.
    expect(el.querySelectorAll('tr.eq-entry-row button[aria-expanded]')).toHaveLength(1);
  });

  it('is read-only: nothing offers to edit or delete an entry', async () => {
    const { el } = await setup();
    const labels = [...el.querySelectorAll('button')].map((b) =>
      `${b.textContent} ${b.getAttribute('aria-label') ?? ''}`.toLowerCase(),
    );
    expect(labels.some((l) => /edit|delete|remove/.test(l))).toBe(false);
  });

  it('shows the API error', async () => {
    const { fixture, http, type, el } = await setup();
    await type('audit-text', 'x');
    await wait(AUDIT_FILTER_DEBOUNCE_MS + 50);
    auditRequest(http).flush(
      { error: { code: 'bad_request', message: 'Invalid query: from: Invalid ISO datetime' } },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('Invalid query');
  });
});
