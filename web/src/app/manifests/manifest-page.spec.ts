import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import type { Layout } from '../layouts/layout';
import { MANIFEST_COLUMNS, type Manifest, type ManifestCheck, templateCsv } from './manifest';
import { ManifestPage } from './manifest-page';

const LAYOUT: Layout = {
  id: 4,
  name: 'Azo dye plate',
  format: '96',
  cuvetteCount: null,
  currentVersion: 2,
  version: 2,
  positionCount: 3,
  roleCounts: { blank: 1, standard: 1, unknown: 1 },
  updatedAt: '2025-03-02T10:00:00.000Z',
  positions: [
    { position: 'A1', role: 'blank' },
    { position: 'B1', role: 'standard', replicateGroup: 'S1' },
    { position: 'C1', role: 'unknown' },
  ],
  versions: [],
};
const { positions: _p, version: _v, versions: _vs, ...SUMMARY } = LAYOUT;

const CLEAN: ManifestCheck = {
  source: 'form',
  fileName: null,
  layoutId: 4,
  layoutVersion: 2,
  samples: [
    { position: 'A1', sampleId: 'BLK-1', role: 'blank' },
    { position: 'B1', sampleId: 'STD-10', role: 'standard', concentrationM: 0.00001, replicateGroup: 'S1' },
    { position: 'C1', sampleId: 'UNK-3', role: 'unknown', dilutionFactor: 1 },
  ],
  problems: [],
  mismatches: [],
};

const SAVED: Manifest = {
  id: 9,
  name: 'Azo run 12',
  layoutId: 4,
  layoutVersion: 2,
  currentVersion: 1,
  version: 1,
  source: 'form',
  fileName: null,
  samples: CLEAN.samples,
  versions: [{ version: 1, createdAt: '2025-03-03T08:00:00.000Z', createdById: 2, source: 'form' }],
  updatedAt: '2025-03-03T08:00:00.000Z',
};

describe('ManifestPage', () => {
  async function setup(opts: { id?: string } = {}) {
    TestBed.configureTestingModule({
      imports: [ManifestPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    jest.spyOn(TestBed.inject(AuthService), 'hasRole').mockReturnValue(true);
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ManifestPage);
    if (opts.id) fixture.componentRef.setInput('id', opts.id);
    fixture.detectChanges();
    http.expectOne('/api/layouts').flush([SUMMARY]);
    if (opts.id) http.expectOne(`/api/manifests/${opts.id}`).flush(SAVED);
    await fixture.whenStable();
    const page = fixture.componentInstance;
    const el = fixture.nativeElement as HTMLElement;
    if (!opts.id) {
      page['form'].controls.layoutId.setValue(4);
      page['form'].controls.name.setValue('Azo run 12');
      await fixture.whenStable();
    }
    http.expectOne('/api/layouts/4').flush(LAYOUT);
    await fixture.whenStable();
    const press = async (testId: string) => {
      el.querySelector<HTMLButtonElement>(`[data-testid="${testId}"]`)!.click();
      await fixture.whenStable();
    };
    const useForm = async () => {
      page['form'].controls.source.setValue('form');
      await fixture.whenStable();
    };
    const typeCell = async (id: string, value: string) => {
      const cell = el.querySelector<HTMLInputElement | HTMLSelectElement>(`#${id}`)!;
      cell.value = value;
      cell.dispatchEvent(new Event(cell instanceof HTMLSelectElement ? 'change' : 'input'));
      await fixture.whenStable();
    };
    const texts = (testId: string) =>
      [...el.querySelectorAll(`[data-testid="${testId}"]`)].map((i) =>
        (i.textContent ?? '').replace(/\s+/g, ' ').trim(),
      );
    return { fixture, page, el, http, press, useForm, typeCell, texts };
  }

  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('uploads a file to check and lists every problem with its row and column', async () => {
    const { fixture, el, http, press, texts } = await setup();
    const file = new File(['position,sample_id,role\nA1,BLK-1,blank\n'], 'azo-run-12.csv', {
      type: 'text/csv',
    });
    const input = el.querySelector<HTMLInputElement>('[data-testid="manifest-file"]')!;
    Object.defineProperty(input, 'files', { value: [file] });
    input.dispatchEvent(new Event('change'));
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="file-name"]')!.textContent).toContain('azo-run-12.csv');
    await press('check-manifest');
    const req = http.expectOne({ method: 'POST', url: '/api/manifests/check' });
    const body = req.request.body as FormData;
    expect(body).toBeInstanceOf(FormData);
    expect(body.get('layoutId')).toBe('4');
    expect((body.get('file') as File).name).toBe('azo-run-12.csv');
    req.flush({
      ...CLEAN,
      source: 'csv',
      fileName: 'azo-run-12.csv',
      samples: [],
      problems: [
        { row: 4, column: 'concentration_M', message: 'must not be negative, found -0.2' },
        {
          row: 3,
          column: 'role',
          message: 'unknown role "blnk": expected one of blank, standard, unknown, mixture, control',
        },
      ],
    });
    await fixture.whenStable();
    expect(texts('problem')).toEqual([
      'Row 3, column role: unknown role "blnk": expected one of blank, standard, unknown, mixture, control',
      'Row 4, column concentration_M: must not be negative, found -0.2',
    ]);
  });

  it('checks typed rows as JSON and focuses the row of a picked problem', async () => {
    const { fixture, el, http, press, useForm, typeCell } = await setup();
    await useForm();
    await press('fill-from-layout');
    expect(el.querySelectorAll('[data-testid="manifest-rows"] tbody tr')).toHaveLength(3);
    await typeCell('mf-0-sample_id', 'BLK-1');
    await typeCell('mf-1-sample_id', 'STD-10');
    await typeCell('mf-2-sample_id', 'UNK-3');
    await press('check-manifest');
    const req = http.expectOne({ method: 'POST', url: '/api/manifests/check' });
    expect(req.request.body.layoutId).toBe(4);
    expect(req.request.body.rows).toHaveLength(3);
    expect(req.request.body.rows[1]).toEqual({
      ...Object.fromEntries(MANIFEST_COLUMNS.map((c) => [c, ''])),
      position: 'B1',
      sample_id: 'STD-10',
      role: 'standard',
      replicate_group: 'S1',
    });
    req.flush({
      ...CLEAN,
      samples: [],
      problems: [
        { row: 3, column: 'concentration_M', message: 'missing concentration_M: a standard needs it' },
      ],
    });
    await fixture.whenStable();
    el.querySelector<HTMLButtonElement>('button[data-testid="problem"]')!.click();
    expect(document.activeElement?.id).toBe('mf-1-concentration_M');

    await typeCell('mf-1-concentration_M', '0.00001');
    expect(el.textContent).toContain('Changed since the last check');
    await press('check-manifest');
    http.expectOne('/api/manifests/check').flush(CLEAN);
    await fixture.whenStable();
    expect(el.textContent).toContain('No problems found');
    expect(el.textContent).toContain('No mismatches');
    const mapped = el.querySelector('[data-testid="mapped-grid"]')!;
    expect(mapped.querySelector('[data-position="B1"]')!.getAttribute('aria-label')).toBe(
      'B1, standard, group S1, sample STD-10',
    );
    expect(mapped.querySelector('[data-position="B1"]')!.textContent).toContain('STD-10');
  });

  it('adds and removes typed rows', async () => {
    const { fixture, el, press, useForm } = await setup();
    await useForm();
    await press('add-row');
    await press('add-row');
    expect(el.querySelectorAll('[data-testid="manifest-rows"] tbody tr')).toHaveLength(2);
    el.querySelector<HTMLButtonElement>('[aria-label="Remove row 3"]')!.click();
    await fixture.whenStable();
    expect(el.querySelectorAll('[data-testid="manifest-rows"] input[id$="-position"]')).toHaveLength(1);
  });

  it('offers to save anyway when the manifest disagrees with the layout', async () => {
    const { fixture, el, http, press, useForm, typeCell, texts } = await setup();
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    await useForm();
    await press('add-row');
    await typeCell('mf-0-position', 'A1');
    await typeCell('mf-0-sample_id', 'BLK-1');
    await typeCell('mf-0-role', 'blank');
    await press('save-manifest');
    const first = http.expectOne({ method: 'POST', url: '/api/manifests' });
    expect(first.request.body).toEqual(expect.objectContaining({ name: 'Azo run 12', layoutId: 4 }));
    expect(first.request.body.acceptMismatches).toBeUndefined();
    first.flush(
      {
        error: {
          code: 'manifest_mismatch',
          message:
            'The manifest and the layout disagree at 2 position(s); fix them or save with acceptMismatches.',
          details: {
            problems: [],
            mismatches: [
              {
                position: 'C1',
                message: 'C1: the layout has a unknown here but the manifest has no sample for it',
              },
              {
                position: 'B1',
                message: 'B1: the layout has a standard here but the manifest has no sample for it',
              },
            ],
          },
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="manifest-error"]')!.textContent).toContain(
      'disagree at 2 position(s)',
    );
    expect(texts('mismatch').map((t) => t.slice(0, 3))).toEqual(['B1:', 'C1:']);
    await press('save-anyway');
    const second = http.expectOne({ method: 'POST', url: '/api/manifests' });
    expect(second.request.body.acceptMismatches).toBe(true);
    second.flush(SAVED);
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/manifests', 9], { replaceUrl: true });
  });

  it('lists the problems of a refused save and names a taken name', async () => {
    const { fixture, el, http, press, useForm, typeCell, texts } = await setup();
    await useForm();
    await press('add-row');
    await typeCell('mf-0-position', 'Z9');
    await press('save-manifest');
    http.expectOne('/api/manifests').flush(
      {
        error: {
          code: 'invalid_manifest',
          message: 'The manifest has 1 problem(s); fix them and upload it again.',
          details: {
            problems: [
              {
                row: 2,
                column: 'position',
                message: 'expected a position such as A1…P24 or C1, C2, …, found "Z9"',
              },
            ],
            mismatches: [],
          },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(texts('problem')[0]).toContain('Row 2, column position: expected a position');
    expect(el.querySelector('[data-testid="save-anyway"]')).toBeNull();

    await typeCell('mf-0-position', 'A1');
    await press('save-manifest');
    http
      .expectOne('/api/manifests')
      .flush(
        { error: { code: 'conflict', message: 'A manifest named "Azo run 12" already exists.' } },
        { status: 409, statusText: 'Conflict' },
      );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="manifest-error"]')!.textContent).toContain('already exists');
    expect(el.querySelector('[data-testid="save-anyway"]')).toBeNull();
  });

  it('edits a saved manifest in the table and saves a new version with PUT and a reason', async () => {
    const { fixture, el, http, press, typeCell } = await setup({ id: '9' });
    expect(el.querySelector('h1')!.textContent).toContain('Azo run 12');
    expect((el.querySelector('#mf-1-concentration_M') as HTMLInputElement).value).toBe('0.00001');
    expect(
      el.querySelector('[data-testid="mapped-grid"] [data-position="C1"]')!.getAttribute('aria-label'),
    ).toContain('sample UNK-3');
    await typeCell('mf-2-dilution_factor', '5');
    const reason = el.querySelector<HTMLInputElement>('input[formControlName="reason"]')!;
    reason.value = 'diluted the unknown';
    reason.dispatchEvent(new Event('input'));
    await press('save-manifest');
    const req = http.expectOne({ method: 'PUT', url: '/api/manifests/9' });
    expect(req.request.body.reason).toBe('diluted the unknown');
    expect(req.request.body.rows[2].dilution_factor).toBe('5');
    expect(req.request.body.name).toBeUndefined();
    req.flush({ ...SAVED, currentVersion: 2, version: 2 });
    await fixture.whenStable();
    expect(el.querySelector('h1')!.textContent).toContain('v2');
  });

  describe('the last request wins', () => {
    const OTHER: Manifest = {
      ...SAVED,
      id: 10,
      name: 'Azo run 13',
      samples: [{ position: 'A1', sampleId: 'BLK-9', role: 'blank' }],
    };

    it('shows the manifest of the last id when the answer for an earlier id comes late', async () => {
      const { fixture, el, http } = await setup({ id: '9' });
      fixture.componentRef.setInput('id', '11');
      await fixture.whenStable();
      const earlier = http.expectOne('/api/manifests/11');
      fixture.componentRef.setInput('id', '10');
      await fixture.whenStable();
      const later = http.expectOne('/api/manifests/10');

      later.flush(OTHER);
      await fixture.whenStable();
      // The earlier request was given up when the later id came: its answer has nowhere to land.
      expect(earlier.cancelled).toBe(true);
      expect(() => earlier.flush({ ...SAVED, id: 11, name: 'Stale run' })).toThrow(/cancelled/);
      await fixture.whenStable();

      expect(el.querySelector('h1')!.textContent).toContain('Azo run 13');
      expect(el.querySelector<HTMLInputElement>('[data-testid="manifest-name"]')!.value).toBe('Azo run 13');
      expect((el.querySelector('#mf-0-sample_id') as HTMLInputElement).value).toBe('BLK-9');
      expect(el.querySelector('#mf-1-sample_id')).toBeNull();
    });

    it('maps onto the layout chosen last when an earlier choice answers late', async () => {
      const { fixture, page, el, http } = await setup();
      const form = page['form'];
      form.controls.layoutId.setValue(5);
      await fixture.whenStable();
      const earlier = http.expectOne('/api/layouts/5');
      form.controls.layoutId.setValue(6);
      await fixture.whenStable();
      const later = http.expectOne('/api/layouts/6');

      later.flush({ ...LAYOUT, id: 6, name: 'Job series plate' });
      expect(earlier.cancelled).toBe(true);
      await fixture.whenStable();
      expect(el.querySelector('#mapped-heading')!.textContent).toContain('Job series plate');
    });

    it('shows the version asked for last when an earlier version answers late', async () => {
      const { fixture, el, http } = await setup({ id: '9' });
      fixture.componentRef.setInput('id', '12');
      await fixture.whenStable();
      http.expectOne('/api/manifests/12').flush({
        ...SAVED,
        id: 12,
        currentVersion: 3,
        version: 3,
        versions: [1, 2, 3].map((version) => ({
          version,
          createdAt: `2025-03-0${version}T08:00:00.000Z`,
          createdById: 2,
          source: 'form',
        })),
      });
      await fixture.whenStable();
      const view = (version: number) =>
        [...el.querySelectorAll<HTMLElement>('[data-testid="manifest-versions"] li')]
          .find((li) => li.textContent!.includes(`v${version}`))!
          .querySelector('button')!
          .click();

      view(1);
      const v1 = http.expectOne('/api/manifests/12/versions/1');
      view(2);
      const v2 = http.expectOne('/api/manifests/12/versions/2');
      v2.flush({ ...SAVED, id: 12, currentVersion: 3, version: 2 });
      expect(v1.cancelled).toBe(true);
      await fixture.whenStable();
      expect(el.querySelector('[data-testid="viewing-version"]')!.textContent).toContain(
        'Viewing version 2 of 3',
      );
    });
  });
});

describe('templateCsv', () => {
  it('offers a template CSV with the header and one invented example per role', () => {
    const lines = templateCsv().trim().split(/\r\n/);
    expect(lines[0]).toBe(MANIFEST_COLUMNS.join(','));
    expect(lines.slice(1).map((l) => l.split(',')[2])).toEqual([
      'blank',
      'standard',
      'unknown',
      'mixture',
      'control',
    ]);
    expect(lines.every((l) => l.split(',').length === MANIFEST_COLUMNS.length)).toBe(true);
  });
});
