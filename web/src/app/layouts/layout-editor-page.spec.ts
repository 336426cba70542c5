import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import type { Role } from '../core/auth/user';
import type { Layout } from './layout';
import { LayoutEditorPage, cellsToPositions } from './layout-editor-page';

const SAVED: Layout = {
  id: 7,
  name: 'Dye calibration plate',
  format: '96',
  cuvetteCount: null,
  currentVersion: 2,
  version: 2,
  positionCount: 3,
  roleCounts: { blank: 1, standard: 2 },
  updatedAt: '2025-03-02T10:00:00.000Z',
  positions: [
    { position: 'A1', role: 'blank' },
    { position: 'B1', role: 'standard', replicateGroup: 'S1' },
    { position: 'B2', role: 'standard', replicateGroup: 'S1' },
  ],
  versions: [
    { version: 1, createdAt: '2025-03-01T09:00:00.000Z', createdById: 2 },
    { version: 2, createdAt: '2025-03-02T10:00:00.000Z', createdById: 2 },
  ],
};

describe('LayoutEditorPage', () => {
  async function setup(opts: { role?: Role; id?: string } = {}) {
    TestBed.configureTestingModule({
      imports: [LayoutEditorPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const auth = TestBed.inject(AuthService);
    jest
      .spyOn(auth, 'hasRole')
      .mockImplementation((...roles: Role[]) => roles.includes(opts.role ?? 'lab_manager'));
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(LayoutEditorPage);
    if (opts.id) fixture.componentRef.setInput('id', opts.id);
    fixture.detectChanges();
    if (opts.id) http.expectOne(`/api/layouts/${opts.id}`).flush(SAVED);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const well = (p: string) => el.querySelector<HTMLElement>(`[data-position="${p}"]`)!;
    const mouse = (target: HTMLElement, type: string, init: MouseEventInit = {}) =>
      target.dispatchEvent(new MouseEvent(type, { bubbles: type !== 'mouseenter', button: 0, ...init }));
    const click = async (p: string, init: MouseEventInit = {}) => {
      mouse(well(p), 'mousedown', init);
      mouse(well(p), 'mouseup', init);
      await fixture.whenStable();
    };
    const press = async (testId: string) => {
      el.querySelector<HTMLButtonElement>(`[data-testid="${testId}"]`)!.click();
      await fixture.whenStable();
    };
    const type = async (selector: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(selector)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    const key = async (key: string, init: KeyboardEventInit = {}) => {
      document.activeElement!.dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true, ...init }));
      await fixture.whenStable();
    };
    const label = (p: string) => well(p).getAttribute('aria-label');
    const selectedCount = () => el.querySelector('[data-testid="selected-count"]')!.textContent!.trim();
    return { fixture, el, http, well, mouse, click, press, type, key, label, selectedCount };
  }

  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('assigns roles and replicate groups to wells selected by click, shift-click and drag', async () => {
    const { fixture, el, click, mouse, well, press, type, label, selectedCount } = await setup();
    await click('A1');
    await click('A3', { shiftKey: true });
    expect(selectedCount()).toBe('3 selected');
    await press('assign-blank');
    expect(label('A2')).toBe('A2, blank');
    expect(well('A2').querySelector('.eq-letter')!.getAttribute('data-letter')).toBe('B');
    expect(selectedCount()).toBe('0 selected');

    mouse(well('B1'), 'mousedown');
    mouse(well('B2'), 'mouseenter');
    mouse(well('C3'), 'mouseenter');
    mouse(document.body, 'mouseup');
    await fixture.whenStable();
    expect(selectedCount()).toBe('6 selected');
    await type('input[formControlName="replicateGroup"]', 'S1');
    await press('assign-standard');
    expect(label('C3')).toBe('C3, standard, group S1');
    expect(el.textContent).toContain('Marked 6 position(s) as standard, group S1.');
    expect(el.querySelector('eq-plate-legend')!.textContent).toMatch(/Standard\s*6/);
  });

  it('selects a whole row and a whole column from the headers, and clears roles', async () => {
    const { fixture, el, press, label, type } = await setup();
    el.querySelector<HTMLElement>('[role="rowheader"][data-r="3"]')!.click();
    await fixture.whenStable();
    await type('input[formControlName="replicateGroup"]', '');
    await press('assign-unknown');
    expect(label('D1')).toBe('D1, unknown');
    expect(label('D12')).toBe('D12, unknown');
    el.querySelector<HTMLElement>('[role="columnheader"][data-c="11"]')!.click();
    await fixture.whenStable();
    await press('assign-control');
    expect(label('D12')).toBe('D12, control');
    expect(label('A12')).toBe('A12, control');
    el.querySelector<HTMLElement>('[role="columnheader"][data-c="11"]')!.click();
    await fixture.whenStable();
    await press('assign-clear');
    expect(label('A12')).toBe('A12, empty');
    expect(label('D11')).toBe('D11, unknown');
  });

  it('selects with the keyboard and assigns a mixture role', async () => {
    const { fixture, well, key, press, label, selectedCount } = await setup();
    well('E5').focus();
    await fixture.whenStable();
    await key(' ');
    await key('ArrowRight', { shiftKey: true });
    await key('ArrowRight', { shiftKey: true });
    expect(selectedCount()).toBe('3 selected');
    await press('assign-mixture');
    expect(label('E7')).toBe('E7, mixture');
    well('A1').focus();
    await key('a', { ctrlKey: true });
    expect(selectedCount()).toBe('96 selected');
  });

  it('creates a layout with POST and opens it', async () => {
    const { fixture, http, click, press, type } = await setup();
    const router = TestBed.inject(Router);
    const navigate = jest.spyOn(router, 'navigate').mockResolvedValue(true);
    await type('[data-testid="layout-name"]', 'Dye calibration plate');
    await click('B2');
    await click('B1');
    await type('input[formControlName="replicateGroup"]', 'S1');
    await press('assign-standard');
    await click('A1');
    await type('input[formControlName="replicateGroup"]', '');
    await press('assign-blank');
    await press('save-layout');
    const req = http.expectOne({ method: 'POST', url: '/api/layouts' });
    expect(req.request.body).toEqual({
      name: 'Dye calibration plate',
      format: '96',
      positions: [
        { position: 'A1', role: 'blank' },
        { position: 'B1', role: 'standard', replicateGroup: 'S1' },
        { position: 'B2', role: 'standard', replicateGroup: 'S1' },
      ],
    });
    req.flush({ ...SAVED, currentVersion: 1, version: 1, versions: SAVED.versions.slice(0, 1) });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/layouts', 7], { replaceUrl: true });
  });

  it('shows the server message when the name is taken', async () => {
    const { fixture, el, http, type, press } = await setup();
    await type('[data-testid="layout-name"]', 'Dye calibration plate');
    await press('save-layout');
    http
      .expectOne('/api/layouts')
      .flush(
        { error: { code: 'conflict', message: 'A layout named "Dye calibration plate" already exists.' } },
        { status: 409, statusText: 'Conflict' },
      );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="layout-error"]')!.textContent).toContain('already exists');
  });

  it('saves an edit as a new version with PUT and a reason, and shows an older version read-only', async () => {
    const { fixture, el, http, click, press, type, label } = await setup({ id: '7' });
    expect(el.querySelector('h1')!.textContent).toContain('v2');
    expect(label('B2')).toBe('B2, standard, group S1');
    await click('C1');
    await type('input[formControlName="replicateGroup"]', '');
    await press('assign-unknown');
    await type('input[formControlName="reason"]', 'added an unknown');
    expect(el.querySelector('[data-testid="save-layout"]')!.textContent).toContain('Save as version 3');
    await press('save-layout');
    const req = http.expectOne({ method: 'PUT', url: '/api/layouts/7' });
    expect(req.request.body.reason).toBe('added an unknown');
    expect(req.request.body.positions).toContainEqual({ position: 'C1', role: 'unknown' });
    req.flush({
      ...SAVED,
      currentVersion: 3,
      version: 3,
      positions: [...SAVED.positions, { position: 'C1', role: 'unknown' }],
      versions: [...SAVED.versions, { version: 3, createdAt: '2025-03-03T08:00:00.000Z', createdById: 2 }],
    });
    await fixture.whenStable();
    expect(el.querySelector('h1')!.textContent).toContain('v3');

    const viewV1 = [...el.querySelectorAll<HTMLButtonElement>('[data-testid="layout-versions"] button')].at(
      -1,
    )!;
    viewV1.click();
    http.expectOne('/api/layouts/7/versions/1').flush({
      ...SAVED,
      version: 1,
      positions: [{ position: 'A1', role: 'blank' }],
    });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="viewing-version"]')!.textContent).toContain(
      'Viewing version 1 of 3',
    );
    expect(el.querySelector('[role="grid"]')!.getAttribute('aria-readonly')).toBe('true');
    expect(label('C1')).toBe('C1, empty');
    expect(el.querySelector('[data-testid="save-layout"]')).toBeNull();
    await click('D4');
    expect(label('D4')).toBe('D4, empty');
  });

  describe('the last request wins', () => {
    const OTHER: Layout = {
      ...SAVED,
      id: 8,
      name: 'Job series plate',
      positions: [{ position: 'H12', role: 'blank' }],
    };

    it('shows the layout of the last id when the answer for an earlier id comes late', async () => {
      const { fixture, el, http, label } = await setup({ id: '7' });
      fixture.componentRef.setInput('id', '9');
      await fixture.whenStable();
      const earlier = http.expectOne('/api/layouts/9');
      fixture.componentRef.setInput('id', '8');
      await fixture.whenStable();
      const later = http.expectOne('/api/layouts/8');

      later.flush(OTHER);
      await fixture.whenStable();
      // The earlier request was given up when the later id came: its answer has nowhere to land.
      expect(earlier.cancelled).toBe(true);
      expect(() => earlier.flush({ ...SAVED, id: 9, name: 'Stale plate' })).toThrow(/cancelled/);
      await fixture.whenStable();

      expect(el.querySelector('h1')!.textContent).toContain('Job series plate');
      expect(el.querySelector<HTMLInputElement>('[data-testid="layout-name"]')!.value).toBe(
        'Job series plate',
      );
      expect(label('H12')).toBe('H12, blank');
      expect(label('A1')).toBe('A1, empty');
      expect(el.textContent).not.toContain('Loading…');
    });

    it('shows the version asked for last when an earlier version answers late', async () => {
      const { fixture, el, http } = await setup({ id: '7' });
      const SAVED3 = {
        ...SAVED,
        currentVersion: 3,
        version: 3,
        versions: [...SAVED.versions, { version: 3, createdAt: '2025-03-03T08:00:00.000Z', createdById: 2 }],
      };
      fixture.componentRef.setInput('id', '70');
      await fixture.whenStable();
      http.expectOne('/api/layouts/70').flush({ ...SAVED3, id: 70 });
      await fixture.whenStable();
      const view = (version: number) =>
        [...el.querySelectorAll<HTMLElement>('[data-testid="layout-versions"] li')]
          .find((li) => li.textContent!.includes(`v${version}`))!
          .querySelector('button')!
          .click();

      view(1);
      const v1 = http.expectOne('/api/layouts/70/versions/1');
      view(2);
      const v2 = http.expectOne('/api/layouts/70/versions/2');
      v2.flush({ ...SAVED3, id: 70, version: 2 });
      expect(v1.cancelled).toBe(true);
      await fixture.whenStable();
      expect(el.querySelector('[data-testid="viewing-version"]')!.textContent).toContain(
        'Viewing version 2 of 3',
      );
    });
  });

  it('is read-only for scientists: no role buttons and no save', async () => {
    const { el, click, label } = await setup({ role: 'scientist', id: '7' });
    expect(el.querySelector('[data-testid="assign-blank"]')).toBeNull();
    expect(el.querySelector('[data-testid="save-layout"]')).toBeNull();
    await click('A2');
    expect(label('A2')).toBe('A2, empty');
    expect(el.querySelector('[role="grid"]')!.getAttribute('aria-readonly')).toBe('true');
  });
});

describe('cellsToPositions', () => {
  it('lists positions in plate order', () => {
    expect(
      cellsToPositions({
        A10: { role: 'blank' },
        A2: { role: 'blank' },
        B1: { role: 'unknown', replicateGroup: 'U' },
      }),
    ).toEqual([
      { position: 'A2', role: 'blank' },
      { position: 'A10', role: 'blank' },
      { position: 'B1', role: 'unknown', replicateGroup: 'U' },
    ]);
  });
});
