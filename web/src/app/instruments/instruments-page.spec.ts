import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import type { Role } from '../core/auth/user';
import { DEFAULT_RULES, type InstrumentProfile } from './instrument-profile';
import { InstrumentsPage } from './instruments-page';

const base = {
  rules: DEFAULT_RULES,
  pathLengthCm: 1,
  fillVolumeUl: null,
  wellDiameterMm: null,
  defaultWavelengthNm: null,
  fileNamePattern: null,
  createdAt: '2031-03-01T08:00:00Z',
  updatedAt: '2031-03-01T08:00:00Z',
};

const PROFILES: InstrumentProfile[] = [
  {
    ...base,
    id: 1,
    name: 'Reader A',
    kind: 'plate_reader',
    plateFormat: '96',
    fileFormat: 'long_table',
    dropSubfolder: 'reader-a',
    active: true,
    hasToken: true,
    tokenPrefix: 'eqi_a1B2',
    tokenCreatedAt: '2031-03-01T08:00:00Z',
  },
  {
    ...base,
    id: 2,
    name: 'Cuvette bench',
    kind: 'cuvette_spectrophotometer',
    plateFormat: 'cuvette',
    fileFormat: 'spectrum',
    dropSubfolder: 'cuvette-1',
    active: false,
    hasToken: false,
    tokenPrefix: null,
    tokenCreatedAt: null,
  },
];

/** Reader A's folder was reported a moment ago; nobody reports for the cuvette bench. */
const PRESENCE = [
  {
    profileId: 1,
    watcherName: 'Bench PC',
    version: '0.1.0',
    hostname: 'bench-pc',
    lastSeenAt: new Date(Date.now() - 120_000).toISOString(),
    silent: false,
  },
];

describe('InstrumentsPage', () => {
  async function setup(role: Role = 'admin') {
    TestBed.configureTestingModule({
      imports: [InstrumentsPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: AuthService, useValue: { hasRole: (...roles: Role[]) => roles.includes(role) } },
        // Dialogs report closing at once instead of after their closing animation.
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    const fixture = TestBed.createComponent(InstrumentsPage);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/watchers/presence').flush(PRESENCE);
    if (role === 'admin') http.expectOne('/api/watchers').flush([]);
    http.expectOne('/api/instruments').flush(PROFILES);
    await fixture.whenStable();
    return { fixture, http, el: fixture.nativeElement as HTMLElement };
  }

  afterEach(() => {
    document.querySelectorAll('.cdk-overlay-container').forEach((c) => (c.innerHTML = ''));
  });

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.mat-mdc-row')].map((r) => r.textContent ?? '');
  const overlay = () => document.querySelector('.cdk-overlay-container') as HTMLElement;

  async function openTokenMenu(fixture: { whenStable(): Promise<unknown> }, el: HTMLElement, name: string) {
    el.querySelector<HTMLButtonElement>(`button[aria-label="Token of ${name}"]`)!.click();
    await fixture.whenStable();
  }

  it('lists profiles with kind, formats, folder, token state and status in words', async () => {
    const { el } = await setup();
    expect(rows(el)).toHaveLength(2);
    const [cuvette, reader] = rows(el);
    expect(reader).toContain('Plate reader');
    expect(reader).toContain('96-well plate');
    expect(reader).toContain('Long table');
    expect(reader).toContain('reader-a/');
    expect(reader).toContain('eqi_a1B2…');
    expect(reader).toContain('Active');
    expect(cuvette).toContain('Cuvette spectrophotometer');
    expect(cuvette).toContain('Cuvette sequence');
    expect(cuvette).toContain('Spectrum');
    expect(cuvette).toContain('None');
    expect(cuvette).toContain('Inactive');
    // Whether a watcher watches each drop folder, and when it last reported.
    expect(reader).toMatch(/Watched\s*2 min ago · v0\.1\.0/);
    expect(cuvette).toContain('No watcher has reported');
  });

  it('lets a lab manager read a profile but change nothing', async () => {
    const { fixture, el } = await setup('lab_manager');
    expect(el.querySelector('[data-testid=add-profile]')).toBeNull();
    expect(el.querySelector('[data-testid=watchers]')).toBeNull();
    expect(el.querySelector('button[aria-label="Edit Reader A"]')).toBeNull();
    expect(rows(el)[1]).not.toContain('eqi_a1B2');
    el.querySelector<HTMLButtonElement>('button[aria-label="Read Reader A"]')!.click();
    await fixture.whenStable();
    expect(overlay().textContent).toContain('Reader A (read only)');
    expect(overlay().querySelector('[data-testid=profile-save]')).toBeNull();
    expect(overlay().querySelector<HTMLInputElement>('[data-testid=profile-name]')!.disabled).toBe(true);
  });

  it('filters by words shown in the table and sorts by a header', async () => {
    const { fixture, el } = await setup();
    const input = el.querySelector<HTMLInputElement>('input[matInput]')!;
    input.value = 'spectrum';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
    expect(rows(el)[0]).toContain('Cuvette bench');
    input.value = '';
    input.dispatchEvent(new Event('input'));
    el.querySelector<HTMLElement>('th.mat-column-name .mat-sort-header-container')!.click();
    await fixture.whenStable();
    expect(rows(el)[0]).toContain('Reader A');
  });

  it('when a token is rotated after confirming then shows the new token once with a copy button and a warning', async () => {
    const { fixture, el, http } = await setup();
    await openTokenMenu(fixture, el, 'Reader A');
    overlay().querySelector<HTMLButtonElement>('[data-testid=rotate-token]')!.click();
    await fixture.whenStable();
    expect(overlay().textContent).toContain('stops working at once');
    overlay().querySelector<HTMLButtonElement>('[data-testid=confirm]')!.click();
    await fixture.whenStable();
    const req = http.expectOne({ method: 'POST', url: '/api/instruments/1/token' });
    req.flush({ profile: { ...PROFILES[0], tokenPrefix: 'eqi_Zz90' }, token: 'eqi_Zz90-plain-secret' });
    await fixture.whenStable();
    http.expectOne('/api/instruments').flush(PROFILES);
    await fixture.whenStable();
    expect(overlay().querySelector('[data-testid=token-value]')?.textContent).toBe('eqi_Zz90-plain-secret');
    expect(overlay().querySelector('[data-testid=copy-token]')).not.toBeNull();
    expect(overlay().textContent).toContain('shown only this once');
  });

  it('when a profile is added then shows its first token once', async () => {
    const { fixture, el, http } = await setup();
    el.querySelector<HTMLButtonElement>('[data-testid=add-profile]')!.click();
    await fixture.whenStable();
    for (const [selector, value] of [
      ['[data-testid=profile-name]', 'Reader C'],
      ['[data-testid=drop-subfolder]', 'reader-c'],
      // A new plate reader: its light path from fill volume and well diameter.
      ['[data-testid=fill-volume]', '200'],
      ['[data-testid=well-diameter]', '6.4'],
    ]) {
      const input = overlay().querySelector<HTMLInputElement>(selector)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
    }
    overlay().querySelector<HTMLButtonElement>('[data-testid=profile-save]')!.click();
    const created = { ...PROFILES[0], id: 3, name: 'Reader C', dropSubfolder: 'reader-c' };
    http
      .expectOne({ method: 'POST', url: '/api/instruments' })
      .flush({ profile: created, token: 'eqi_first-token' }, { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    http.expectOne('/api/instruments').flush([...PROFILES, created]);
    await fixture.whenStable();
    expect(overlay().querySelector('[data-testid=token-value]')?.textContent).toBe('eqi_first-token');
    expect(overlay().textContent).toContain('Instrument token for Reader C');
    expect(rows(el)).toHaveLength(3);
  });

  it('when revoking is cancelled then sends nothing; when confirmed then deletes the token', async () => {
    const { fixture, el, http } = await setup();
    await openTokenMenu(fixture, el, 'Reader A');
    overlay().querySelector<HTMLButtonElement>('[data-testid=revoke-token]')!.click();
    await fixture.whenStable();
    overlay()
      .querySelector<HTMLButtonElement>('mat-dialog-actions button:not([data-testid=confirm])')!
      .click();
    await fixture.whenStable();
    http.expectNone('/api/instruments/1/token');

    await openTokenMenu(fixture, el, 'Reader A');
    overlay().querySelector<HTMLButtonElement>('[data-testid=revoke-token]')!.click();
    await fixture.whenStable();
    overlay().querySelector<HTMLButtonElement>('[data-testid=confirm]')!.click();
    await fixture.whenStable();
    http
      .expectOne({ method: 'DELETE', url: '/api/instruments/1/token' })
      .flush({ ...PROFILES[0], hasToken: false, tokenPrefix: null, tokenCreatedAt: null });
    await fixture.whenStable();
    http.expectOne('/api/instruments').flush(PROFILES);
  });

  it('offers no revoke for a profile without a token', async () => {
    const { fixture, el } = await setup();
    await openTokenMenu(fixture, el, 'Cuvette bench');
    const revoke = overlay().querySelector<HTMLButtonElement>('[data-testid=revoke-token]')!;
    expect(revoke.disabled).toBe(true);
    expect(overlay().textContent).toContain('Create token');
  });

  it('when the list cannot be loaded then shows the server message', async () => {
    TestBed.configureTestingModule({
      imports: [InstrumentsPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(InstrumentsPage);
    fixture.detectChanges();
    TestBed.inject(HttpTestingController)
      .expectOne('/api/instruments')
      .flush(
        { error: { code: 'forbidden', message: 'Only administrators manage instruments.' } },
        { status: 403, statusText: 'Forbidden' },
      );
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain(
      'Only administrators manage instruments.',
    );
  });
});
