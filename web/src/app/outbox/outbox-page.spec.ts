import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { OutboxPage } from './outbox-page';

const MESSAGES = [
  {
    id: 7,
    from: 'Equilight <equilight@localhost>',
    to: 'manager@equilight.test',
    subject: 'Batch approved: Iron series',
    text: 'Hello Mika,\n\nMika approved batch "Iron series".',
    html: '<p>Hello Mika,</p><script>window.hacked = true</script>',
    rawSize: 1200,
    receivedAt: '2026-03-02T10:00:00.000Z',
  },
  {
    id: 6,
    from: 'Equilight <equilight@localhost>',
    to: 'new@equilight.test',
    subject: 'You have been invited to Equilight',
    text: 'Set your password: http://localhost:4210/set-password?token=abc',
    html: null,
    rawSize: 900,
    receivedAt: '2026-03-02T09:00:00.000Z',
  },
];

describe('OutboxPage', () => {
  async function setup(answer: (http: HttpTestingController) => void) {
    TestBed.configureTestingModule({
      imports: [OutboxPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(OutboxPage);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    answer(http);
    await fixture.whenStable();
    fixture.detectChanges();
    return { fixture, http, el: fixture.nativeElement as HTMLElement };
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.mat-mdc-row')].map((r) => r.textContent ?? '');

  it('lists the messages, newest first, and shows one in full when its subject is chosen', async () => {
    const { fixture, el } = await setup((http) =>
      http.expectOne('/api/outbox?page=0&pageSize=25').flush({ items: MESSAGES, total: 2 }),
    );
    expect(rows(el)).toHaveLength(2);
    expect(rows(el)[0]).toContain('Batch approved: Iron series');
    expect(rows(el)[1]).toContain('new@equilight.test');
    expect(el.querySelector('[data-testid="outbox-message"]')).toBeNull();
    el.querySelectorAll<HTMLButtonElement>('button.eq-link')[1].click();
    await fixture.whenStable();
    const message = el.querySelector('[data-testid="outbox-message"]')!;
    expect(message.textContent).toContain('You have been invited to Equilight');
    expect(message.querySelector('pre')!.textContent).toContain('/set-password?token=abc');
  });

  it('renders the HTML part in a sandboxed frame, never in the page', async () => {
    const { fixture, el } = await setup((http) =>
      http.expectOne('/api/outbox?page=0&pageSize=25').flush({ items: MESSAGES, total: 2 }),
    );
    el.querySelector<HTMLButtonElement>('button.eq-link')!.click();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="outbox-message"] script')).toBeNull();
    expect((window as unknown as { hacked?: boolean }).hacked).toBeUndefined();
  });

  it('asks the server for the next page when the paginator moves', async () => {
    const { fixture, http, el } = await setup((h) =>
      h.expectOne('/api/outbox?page=0&pageSize=25').flush({ items: MESSAGES, total: 60 }),
    );
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    http.expectOne('/api/outbox?page=1&pageSize=25').flush({ items: [], total: 60 });
    await fixture.whenStable();
    expect(el.textContent).toContain('No mail has been sent yet.');
  });

  it('explains that there is no outbox when the server runs no stand-in', async () => {
    const { el } = await setup((http) =>
      http
        .expectOne('/api/outbox?page=0&pageSize=25')
        .flush(
          { error: { code: 'not_found', message: 'no stand-in' } },
          { status: 404, statusText: 'Not Found' },
        ),
    );
    expect(el.textContent).toContain('there is no local outbox');
    expect(el.querySelector('table')).toBeNull();
  });
});
