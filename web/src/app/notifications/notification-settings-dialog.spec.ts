import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatDialogRef } from '@angular/material/dialog';
import { NotificationSettingsDialog } from './notification-settings-dialog';

describe('NotificationSettingsDialog', () => {
  it('shows the saved choices and sends the changed ones', async () => {
    const close = jest.fn();
    TestBed.configureTestingModule({
      imports: [NotificationSettingsDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    const fixture = TestBed.createComponent(NotificationSettingsDialog);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    http
      .expectOne('/api/me/notifications')
      .flush({ batchComplete: true, qcFailure: false, batchApproved: true });
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const switches = [...el.querySelectorAll<HTMLButtonElement>('button[role="switch"]')];
    expect(switches.map((s) => s.getAttribute('aria-checked'))).toEqual(['true', 'false', 'true']);
    switches[2].click();
    await fixture.whenStable();
    el.querySelector<HTMLButtonElement>('[data-testid="notify-save"]')!.click();
    const put = http.expectOne({ method: 'PUT', url: '/api/me/notifications' });
    expect(put.request.body).toEqual({ batchComplete: true, qcFailure: false, batchApproved: false });
    put.flush({ batchComplete: true, qcFailure: false, batchApproved: false });
    await fixture.whenStable();
    expect(close).toHaveBeenCalledWith({ batchComplete: true, qcFailure: false, batchApproved: false });
  });

  it('shows the server message when saving fails', async () => {
    TestBed.configureTestingModule({
      imports: [NotificationSettingsDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialogRef, useValue: { close: jest.fn() } },
      ],
    });
    const fixture = TestBed.createComponent(NotificationSettingsDialog);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    http
      .expectOne('/api/me/notifications')
      .flush({ batchComplete: true, qcFailure: true, batchApproved: true });
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    el.querySelector<HTMLButtonElement>('[data-testid="notify-save"]')!.click();
    http
      .expectOne({ method: 'PUT', url: '/api/me/notifications' })
      .flush(
        { error: { code: 'unauthorized', message: 'Sign in first.' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('Sign in first.');
  });
});
